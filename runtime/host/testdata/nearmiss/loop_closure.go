//go:build ignore

// Since Go 1.22 each iteration of a loop has its own loop variable (The Go Programming Language
// Specification, "For statements with for clause" and "with range clause"), so function
// literals and pointers made in different iterations see different values. The interpreter
// shares one variable among the iterations (it printed 3 3 3 6 6 3 3 3); tally now gives each
// iteration a copy.
//
// prints: 0 1 2 5 6 0 1 2
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
	var fs []func() int
	for i := 0; i < 3; i++ {
		fs = append(fs, func() int { return i })
	}
	for _, v := range []int{5, 6} {
		fs = append(fs, func() int { return v })
	}
	var ps []*int
	for i := 0; i < 3; i++ {
		ps = append(ps, &i)
	}
	for _, f := range fs {
		fmt.Print(f(), " ")
	}
	fmt.Println(*ps[0], *ps[1], *ps[2])
	run()
}
