//go:build ignore

// A method value with a pointer receiver binds the variable's address (The Go Programming
// Language Specification, "Method values"): a later call changes the variable. One with a value
// receiver, from a variable that does not change, runs alike both ways.
//
// prints: 7 101 true
package main

import (
	"fmt"

	"tally/blocks/stats"

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

type counter struct{ n int }

func (c *counter) add(k int) { c.n += k }

func main() {
	a := &counter{}
	f := a.add
	f(3)
	f(4)
	var b counter
	g := b.add
	b.n = 100
	g(1)
	e := stats.Estimate{Low: 0.25, High: 0.75}
	in := e.Contains
	fmt.Println(a.n, b.n, in(0.5))
	run()
}
