package link_test

import (
	"fmt"

	"tally/blocks/link"
	"tally/blocks/rng"
)

// On a link with no decoder a custom block after the decisions sees Out nil: the link counts
// Hard against Bits. Here the block flips the first 3 decisions of 8 bits: 3 errors.
func ExampleFrame() {
	var bits, hard []byte
	src := link.Func("src", func(f *link.Frame, r *rng.Stream) {
		bits = link.GrowBytes(bits, 8)
		r.Bits(bits)
		f.Bits, f.Coded = bits, bits
	})
	decide := link.Func("decide", func(f *link.Frame, r *rng.Stream) {
		hard = link.GrowBytes(hard, len(f.Coded))
		copy(hard, f.Coded)
		f.Hard = hard
	})
	flip := link.Func("flip", func(f *link.Frame, r *rng.Stream) {
		fmt.Println("Out is nil:", f.Out == nil)
		for i := range 3 {
			f.Hard[i] ^= 1
		}
	})
	l := link.Chain(src, decide, flip)
	counts := make([]link.Tally, len(l.Taps()))
	var f link.Frame
	if err := l.Run(&f, 1, 0, 0, counts); err != nil {
		fmt.Println(err)
	}
	fmt.Println(l.Taps()[0], counts[0].Errors, "of", counts[0].Trials)
	// Output:
	// Out is nil: true
	// ber 3 of 8
}
