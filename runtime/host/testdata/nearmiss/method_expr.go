//go:build ignore

// A method expression is valid Go; the interpreter failed on it while running, in words of
// its own. tally refuses it.
//
// prints: 4
// interpreter: 39:7: the interpreter cannot run the method expression level.get
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
	g := level.get
	fmt.Println(g(level{4}))
	run()
}
