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
	ebn0 := x.Axis("ebn0_db", sim.Range(0, 10, 1)...)
	probe := func(m *modem.Modem) func(p sim.Point) *link.Link { // the probe's link with modem m
		return func(p sim.Point) *link.Link {
			return link.Chain(source.Random(2048), m.Mod(), channel.AWGN(ebn0.At(p)), m.Demod())
		}
	}
	x.Legend("modem").TheoryName("coherent")
	x.Curve("BPSK", probe(modem.BPSK())).Theory(theory.BPSK)
	x.Curve("QPSK", probe(modem.QPSK())).Theory(theory.QPSK).Scatter(6) // received symbols at 6 dB
	x.Stop(stop.Errors(20), stop.Bits(1e5))
	x.Target(1e-5) // each curve against its own theory
	x.Run()
}
