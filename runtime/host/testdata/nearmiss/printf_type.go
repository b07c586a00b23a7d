//go:build ignore

// %T prints the Go name of a value's type (package fmt, "Printing"); the interpreter printed
// a name of its own (struct { Xdb float64 }), and %+v its own field names. tally refuses them.
//
// prints: main.gain {db:1}
// interpreter: 38:25: the interpreter prints %T with names of its own
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

type gain struct{ db float64 }

func main() {
	g := gain{db: 1}
	fmt.Printf("%T %+v\n", g, g)
	run()
}
