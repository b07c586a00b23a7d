//go:build ignore

// The built-ins min and max are valid since Go 1.21; the interpreter did not know them.
//
// prints: 1 2.5
// interpreter: 34:14: the interpreter lacks the built-in min
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

// run is a small experiment, so that the script runs like any other and its table can be
// compared between the two ways.
func run() {
	x := sim.New("near miss")
	x.Sweep("ebn0_db", 2, 4)
	x.Link(func(p sim.Point) *link.Link {
		m := modem.BPSK()
		return link.Chain(source.Random(200), m.Mod(), channel.AWGN(p.Get("ebn0_db")), m.Demod())
	})
	x.Stop(stop.Errors(20), stop.Bits(2e4))
	x.Run()
}

func main() {
	fmt.Println(min(3, 1, 2), max(2.5, 1))
	run()
}
