//go:build ignore

// The arguments and receiver of a deferred call are evaluated at the defer statement (The Go
// Programming Language Specification, "Defer statements"). The interpreter read variables,
// fields and elements when the call ran (it printed main 2 2 2 2 9 [9 2]); tally now
// has them evaluated at the defer statement.
//
// prints: main 1 0 1 1 1 [9 2]
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

func (g gain) show() { fmt.Print(g.db, " ") }

func report() {
	n := 1
	g := gain{db: 1}
	xs := []int{1, 2}
	defer fmt.Println(xs[0], xs)
	defer g.show()
	defer fmt.Print(n, " ")
	for i := 0; i < 2; i++ {
		defer fmt.Print(i, " ")
	}
	n, g.db, xs[0] = 2, 2, 9
	fmt.Print("main ")
}

func main() {
	report()
	run()
}
