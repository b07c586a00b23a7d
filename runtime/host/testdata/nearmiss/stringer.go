//go:build ignore

// fmt calls the String method of a value that has one (package fmt, "Printing"); in the
// interpreter fmt does not see the methods of the script's types (it printed 3). tally refuses
// the call: a sweep label made this way would differ between the two tables.
//
// prints: 3.0 dB
// interpreter: 41:14: the interpreter's fmt calls the String, GoString and Format methods of level otherwise
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

type level float64

func (l level) String() string { return fmt.Sprintf("%.1f dB", float64(l)) }

func main() {
	var l level = 3
	fmt.Println(l)
	run()
}
