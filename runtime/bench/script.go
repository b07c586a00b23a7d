//go:build ignore

// The standard links of tally bench: BPSK and Gray 16-QAM over AWGN with hard decisions, a
// fixed number of bits each. tally bench runs this file in the interpreter with the bit count
// of its -bits flag; tally run runs it as it stands. The script only builds the links: every
// frame runs in the compiled blocks.
package main

import (
	"fmt"

	"tally/blocks/channel"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/source"
	"tally/blocks/stop"
	"tally/runtime/sim"
)

const bits = 2e7 // bits per link; tally bench -bits replaces this line

func main() {
	x := sim.New("tally bench links")
	x.SweepLabels("link", "bpsk-awgn", "qam16-awgn")
	x.Link(func(p sim.Point) *link.Link {
		if p.Label("link") == "bpsk-awgn" {
			m := modem.BPSK()
			return link.Chain(source.Random(8192), m.Mod(), channel.AWGN(6), m.Demod())
		}
		m := modem.QAM(16)
		return link.Chain(source.Random(8192), m.Mod(), channel.AWGN(10), m.Demod())
	})
	x.Stop(stop.Bits(bits))
	fmt.Println("running the links") // tally bench starts its CPU clock here
	x.Run()
}
