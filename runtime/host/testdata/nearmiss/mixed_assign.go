//go:build ignore

// yaegi v0.16 drops the constants of a multiple assignment with = that mixes constants and
// other values (it left a at 0); tally refuses the statement rather than run it wrongly.
//
// prints: 1 2
// interpreter: 37:2: mixes constants and other values
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
	s := []int{1, 2}
	a, b := 0, 0
	a, b = 1, len(s)
	fmt.Println(a, b)
	run()
}
