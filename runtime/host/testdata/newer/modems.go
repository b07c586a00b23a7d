//go:build ignore

// Riverbank gauge uplink: water-level gauges strung along a river send a short reading every
// few minutes to a relay on the hill above the valley. The radio is still open: coherent
// BPSK, QPSK, 8-PSK or 16-QAM need carrier recovery in the gauge's receiver chain at the relay,
// DBPSK only a symbol delay, noncoherent BFSK hardly more than two filters and an energy
// comparison. This run compares the six over AWGN with their theory curves and finds the Eb/N0
// each needs for the link's (invented) design point, a BER of 1e-4.
package main

import (
	"tally/blocks/channel"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/source"
	"tally/blocks/stop"
	"tally/blocks/theory"
	"tally/runtime/sim"
)

func main() {
	x := sim.New("Riverbank gauge uplink: six modems over AWGN")
	ebn0 := x.Axis("ebn0_db", sim.Range(0, 14, 1)...)
	gauge := func(m *modem.Modem) func(p sim.Point) *link.Link { // the gauge's link with modem m
		return func(p sim.Point) *link.Link {
			return link.Chain(source.Random(2400), m.Mod(), channel.AWGN(ebn0.At(p)), m.Demod())
		}
	}
	x.Legend("modem")
	x.Curve("BPSK", gauge(modem.BPSK())).Theory(theory.BPSK)
	x.Curve("QPSK", gauge(modem.QPSK())).Theory(theory.QPSK)
	x.Curve("8-PSK", gauge(modem.PSK(8))).Theory(theory.PSKCurve(8))
	x.Curve("16-QAM", gauge(modem.QAM(16))).Theory(theory.QAMCurve(16))
	x.Curve("DBPSK", gauge(modem.DBPSK())).Theory(theory.DBPSK)
	x.Curve("BFSK-NC", gauge(modem.BFSKNoncoherent())).Theory(theory.BFSKNoncoherent)
	x.Stop(stop.Errors(20), stop.Bits(1e5))
	x.StopSweep(stop.Floor(1e-5))
	x.Target(1e-4)
	x.Run()
}
