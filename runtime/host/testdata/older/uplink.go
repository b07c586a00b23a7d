//go:build ignore

// Orchard soil-probe uplink: a field of battery probes reports to a mast at the packing shed.
// Before choosing between BPSK and QPSK for the radio, check both over AWGN against theory and
// find the Eb/N0 each needs for a BER of 1e-5, the design point of this invented link.
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
	x := sim.New("Orchard soil-probe uplink: BPSK and QPSK over AWGN")
	x.Sweep("ebn0_db", sim.Range(0, 10, 1)...)
	x.SweepLabels("modem", "BPSK", "QPSK")
	x.Link(func(p sim.Point) *link.Link {
		m := modem.BPSK()
		if p.Label("modem") == "QPSK" {
			m = modem.QPSK()
		}
		return link.Chain(
			source.Random(2048),
			m.Mod(),
			channel.AWGN(p.Get("ebn0_db")),
			m.Demod(),
		)
	})
	x.Stop(stop.Errors(20), stop.Bits(1e5))
	x.Theory("coherent", func(p sim.Point) float64 { return theory.BPSK(p.Get("ebn0_db")) })
	x.Target(1e-5, "coherent")
	x.Scatter(6, 1) // the received QPSK symbols at 6 dB
	x.Run()
}
