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

// pick is the modem for a sweep label.
func pick(name string) *modem.Modem {
	switch name {
	case "QPSK":
		return modem.QPSK()
	case "8-PSK":
		return modem.PSK(8)
	case "16-QAM":
		return modem.QAM(16)
	case "DBPSK":
		return modem.DBPSK()
	case "BFSK-NC":
		return modem.BFSKNoncoherent()
	}
	return modem.BPSK()
}

// closedForm is the theory curve for a sweep label.
func closedForm(name string, ebn0 float64) float64 {
	switch name {
	case "QPSK":
		return theory.QPSK(ebn0)
	case "8-PSK":
		return theory.PSK(8, ebn0)
	case "16-QAM":
		return theory.QAM(16, ebn0)
	case "DBPSK":
		return theory.DBPSK(ebn0)
	case "BFSK-NC":
		return theory.BFSKNoncoherent(ebn0)
	}
	return theory.BPSK(ebn0)
}

func main() {
	x := sim.New("Riverbank gauge uplink: six modems over AWGN")
	x.Sweep("ebn0_db", sim.Range(0, 14, 1)...)
	x.SweepLabels("modem", "BPSK", "QPSK", "8-PSK", "16-QAM", "DBPSK", "BFSK-NC")
	x.Link(func(p sim.Point) *link.Link {
		m := pick(p.Label("modem"))
		return link.Chain(
			source.Random(2400), // a multiple of 1, 2, 3 and 4 bits per symbol
			m.Mod(),
			channel.AWGN(p.Get("ebn0_db")),
			m.Demod(),
		)
	})
	x.Stop(stop.Errors(20), stop.Bits(1e5))
	x.StopSweep(stop.Floor(1e-5))
	x.Theory("theory", func(p sim.Point) float64 { return closedForm(p.Label("modem"), p.Get("ebn0_db")) })
	x.Target(1e-4, "theory")
	x.Run()
}
