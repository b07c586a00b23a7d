package channel_test

import (
	"fmt"

	"tally/blocks/channel"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/source"
	"tally/blocks/stats"
)

// A BPSK link at Eb/N0 14 dB (BER 6.8e-13 in theory, Q(√(2Eb/N0))), estimated by importance sampling from
// 51 200 symbols: plain counting would need about 1e14 bits for the same interval.
func ExampleWhiteNoise_Bias() {
	m := modem.BPSK()
	l := link.Chain(source.Random(1024), m.Mod(), channel.AWGN(14), m.Demod()).Estimate("importance")
	var f link.Frame
	var sum link.Tally
	c := make([]link.Tally, len(l.Taps()))
	for i := range 50 {
		clear(c)
		if err := l.Run(&f, 1, 0, i, c); err != nil {
			panic(err)
		}
		sum.Add(c[0])
	}
	e, _ := stats.Weighted(sum, 0.95)
	fmt.Printf("BER %.2g, 95 %% interval %.2g to %.2g (%s)\n", e.Rate, e.Low, e.High, e.Method)
	// Output:
	// BER 6.6e-13, 95 % interval 6.4e-13 to 6.8e-13 (importance-sampling+t)
}
