//go:build ignore

// Converter resolution for a 64-QAM point-to-point radio of our own design (a rooftop link
// between two buildings of a campus, clear line of sight, so AWGN). Fewer ADC bits save power
// in the receiver; how few can it take? An automatic gain control holds the signal's RMS per
// rail 9 dB below full scale, and each curve is one resolution: the quantisation noise adds to
// the channel's, which costs Eb/N0 first and then, once it dominates, sets an error floor that
// no transmit power removes. The ideal converter should sit on the theory curve.
package main

import (
	"tally/blocks/channel"
	"tally/blocks/impair"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/source"
	"tally/blocks/stop"
	"tally/blocks/theory"
	"tally/runtime/sim"
)

func main() {
	x := sim.New("Campus rooftop link: 64-QAM against ADC resolution")
	ebn0 := x.Axis("ebn0_db", sim.Range(10, 24, 2)...)
	adc := func(bits int) func(p sim.Point) *link.Link { // 0 bits is no converter at all
		return func(p sim.Point) *link.Link {
			m := modem.QAM(64)
			return link.Chain(source.Random(6000), m.Mod(), channel.AWGN(ebn0.At(p)), impair.ADC(bits).Load(9), m.Demod())
		}
	}
	qam64 := theory.QAMCurve(64) // every resolution against the ideal converter's theory
	x.Legend("adc").TheoryName("qam64")
	x.Curve("3 bits", adc(3)).Theory(qam64)
	x.Curve("4 bits", adc(4)).Theory(qam64)
	x.Curve("5 bits", adc(5)).Theory(qam64)
	x.Curve("6 bits", adc(6)).Theory(qam64)
	x.Curve("ideal", adc(0)).Theory(qam64)
	x.Stop(stop.Errors(200), stop.Bits(3e6))
	x.Target(1e-4)
	x.Run()
}
