//go:build ignore

// A blank variable declared only for its type is valid Go; tally used to refuse it inside a
// function ("cannot use _ as value").
//
// prints: blank declarations are valid
package main

import (
	"fmt"

	"tally/blocks/rng"

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

var _ sim.Point

func main() {
	var _ *rng.Stream
	fmt.Println("blank declarations are valid")
	run()
}
