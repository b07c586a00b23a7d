//go:build ignore

// Theory curves built in a loop, each closure over its own iteration's variables (The Go
// Programming Language Specification, "For statements with range clause", since Go 1.22).
// The interpreter shared the variables among the iterations once the closures went to
// compiled code, even through "name := name": both columns held the last curve (theory_bpsk
// equal to theory_half). tally now gives each closure its own copies; the test compares the
// tables of the two ways.
//
// prints: 2 curves
package main

import (
	"fmt"

	"tally/blocks/channel"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/source"
	"tally/blocks/stop"
	"tally/blocks/theory"
	"tally/runtime/sim"
)

func main() {
	x := sim.New("near miss")
	x.Sweep("ebn0_db", 2, 4)
	x.Link(func(p sim.Point) *link.Link {
		m := modem.BPSK()
		return link.Chain(source.Random(200), m.Mod(), channel.AWGN(p.Get("ebn0_db")), m.Demod())
	})
	x.Stop(stop.Errors(20), stop.Bits(2e4))
	n := 0
	for _, name := range []string{"bpsk", "half"} {
		scale := 1.0
		if name == "half" {
			scale = 0.5
		}
		x.Theory(name, func(p sim.Point) float64 {
			return scale * theory.BPSK(p.Get("ebn0_db"))
		})
		n++
	}
	fmt.Println(n, "curves")
	x.Run()
}
