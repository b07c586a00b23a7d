//go:build ignore

// A microwave backhaul hop of our own design (two masts 18 km apart over farmland, clear line
// of sight), carrying 16-QAM and specified at BER 1e-12: at that rate plain counting needs
// about 1e14 bits per point, so the low end of the curve is estimated instead (see the
// README's section on estimators).
//
//   - "ideal": Gray 16-QAM over AWGN by importance sampling, against the exact theory: the
//     check that the estimator is right where the answer is known.
//   - "amplifier": the same hop with root-raised-cosine pulses (roll-off 0.25) through a
//     solid-state amplifier (Rapp, p = 2) at 6 dB input back-off, a linear matched-filter
//     receiver: no closed form. The noise is the last random element before a linear receiver,
//     so the semi-analytic estimator is exact there.
//   - "amplifier, counted": the same link by plain counting, capped at 1e7 bits, to show the
//     estimators agree with counting where counting can reach.
//
// Each point stops at the precision of 100 counted errors (for the estimators: the same
// relative standard error) or at its bit cap.
package main

import (
	"tally/blocks/channel"
	"tally/blocks/impair"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/pulse"
	"tally/blocks/source"
	"tally/blocks/stop"
	"tally/blocks/theory"
	"tally/runtime/sim"
)

func main() {
	x := sim.New("Farmland backhaul hop: 16-QAM specified at BER 1e-12")
	x.Sweep("ebn0_db", sim.Range(8, 21, 1)...)
	x.SweepLabels("path", "ideal", "amplifier", "amplifier, counted")
	x.Link(func(p sim.Point) *link.Link {
		m := modem.QAM(16)
		db := p.Get("ebn0_db")
		if p.Label("path") == "ideal" {
			return link.Chain(source.Random(4096), m.Mod(), channel.AWGN(db), m.Demod()).Estimate("importance")
		}
		rrc := pulse.RRC(0.25)
		l := link.Chain(source.Random(4096), m.Mod(), rrc.Shape(), impair.Rapp(6, 2), channel.AWGN(db),
			rrc.Match(), pulse.Sample(), m.Demod())
		if p.Label("path") == "amplifier" {
			l.Estimate("semi-analytic")
		}
		return l
	})
	x.Stop(stop.Errors(20), stop.Bits(6e4))
	x.Theory("qam16", func(p sim.Point) float64 { return theory.QAM(16, p.Get("ebn0_db")) })
	x.Target(1e-12, "qam16")
	x.Run()
}
