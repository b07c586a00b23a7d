package equalize_test

import (
	"fmt"

	"tally/blocks/channel"
	"tally/blocks/equalize"
)

// Equalisers for a known three-path channel, and an adaptive one trained on each frame's
// first 128 symbols:
//
//	ch := channel.Multipath([]complex128{0.3, 1, 0.4i})
//	link.Chain(source.Random(8192), m.Mod(), ch, channel.AWGN(ebn0), equalize.MMSE(ch.Taps(), 11), m.Demod())
//	link.Chain(source.Random(8192), m.Mod(), ch, channel.AWGN(ebn0), equalize.LMS(11, 0.05).Training(128), m.Demod())
func ExampleMMSE() {
	ch := channel.Multipath([]complex128{0.3, 1, 0.4i})
	_, d, c := equalize.ZF(ch.Taps(), 11).Weights(0)
	fmt.Printf("delay %d, gain on the wanted symbol %.4f\n", d, real(c[d]))
	fmt.Println(equalize.LMS(11, 3).Err())
	// Output:
	// delay 5, gain on the wanted symbol 1.0000
	// equalize.LMS: step μ = 3 must lie in (0, 2)
}
