//go:build ignore

// Deferring a call of a function value is valid Go; the interpreter ran the call and then
// never returned (tally hung). tally refuses it.
//
// prints: report done
// interpreter: 36:8: the interpreter hangs once deferred code calls a function value (done)
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

func report() {
	done := func() { fmt.Println("done") }
	defer done()
	fmt.Print("report ")
}

func main() {
	report()
	run()
}
