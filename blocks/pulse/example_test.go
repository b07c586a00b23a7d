package pulse_test

import (
	"fmt"

	"tally/blocks/pulse"
)

// An oversampled link: shape, channel, matched filter, sample back to one sample per symbol.
//
//	p := pulse.RRC(0.35).Span(12).SPS(4)
//	link.Chain(source.Random(4096), m.Mod(), p.Shape(), pulse.Timing(0.1).Drift(20),
//		channel.AWGN(ebn0), p.Match(), pulse.Sample(), m.Demod())
func ExampleRRC() {
	p := pulse.RRC(0.35).Span(12).SPS(4)
	fmt.Println(len(p.Taps()), p.Err())
	fmt.Println(pulse.RRC(0.35).Span(5).Err())
	// Output:
	// 49 <nil>
	// pulse.RRC: span 5 symbols must be even and ≥ 2
}
