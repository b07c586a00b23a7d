//go:build ignore

// The standard library's generic functions are valid Go; the interpreter carries none of them
// ("undefined selector: slices.Sort"). tally names the function.
//
// prints: [1 2 3]
// interpreter: 37:2: the interpreter does not carry slices.Sort (a generic function
package main

import (
	"fmt"
	"slices"

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
	s := []float64{3, 1, 2}
	slices.Sort(s)
	fmt.Println(s)
	run()
}
