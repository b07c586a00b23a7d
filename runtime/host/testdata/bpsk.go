//go:build ignore

// BPSK over AWGN through the whole path: source, modulator, channel, detector, counter.
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
	x := sim.New("BPSK over AWGN")
	x.Sweep("ebn0_db", 0, 2, 4, 6, 7, 8)
	x.Link(func(p sim.Point) *link.Link {
		m := modem.BPSK()
		return link.Chain(source.Random(1000), m.Mod(), channel.AWGN(p.Get("ebn0_db")), m.Demod())
	})
	x.Stop(stop.Errors(400), stop.Bits(4e6))
	x.Confidence(0.999)
	x.Theory("bpsk", func(p sim.Point) float64 { return theory.BPSK(p.Get("ebn0_db")) })
	x.Run()
}
