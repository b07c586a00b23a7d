//go:build ignore

// A method value with a value receiver binds a copy of the receiver made where it is written
// (The Go Programming Language Specification, "Method values"); the interpreter binds the
// variable, so a later change showed (it printed 100). tally refuses it.
//
// prints: 3
// interpreter: 41:7: the interpreter binds the method value b.get to the variable b
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

type level struct{ n int }

func (l level) get() int { return l.n }

func main() {
	b := level{n: 3}
	g := b.get
	b.n = 100
	fmt.Println(g())
	run()
}
