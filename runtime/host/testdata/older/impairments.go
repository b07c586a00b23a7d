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
	x.Sweep("ebn0_db", sim.Range(10, 24, 2)...)
	x.SweepLabels("adc", "3 bits", "4 bits", "5 bits", "6 bits", "ideal")
	bits := []int{3, 4, 5, 6, 0} // per label; 0 bits is no converter at all
	x.Link(func(p sim.Point) *link.Link {
		m := modem.QAM(64)
		return link.Chain(
			source.Random(6000),
			m.Mod(),
			channel.AWGN(p.Get("ebn0_db")),
			impair.ADC(bits[p.Int("adc")]).Load(9),
			m.Demod(),
		)
	})
	x.Stop(stop.Errors(20), stop.Bits(6e4))
	x.Theory("qam64", func(p sim.Point) float64 { return theory.QAM(64, p.Get("ebn0_db")) })
	x.Target(1e-4, "qam64")
	x.Run()
}
