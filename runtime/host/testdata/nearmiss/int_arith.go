//go:build ignore

// Integer division truncates toward zero, the remainder has the sign of the dividend, and
// integers wrap around on overflow (The Go Programming Language Specification, "Arithmetic
// operators" and "Integer overflow").
//
// prints: -3 -1 -4 44 -2147483648 4 3.5
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
	x, y := -7, 2
	var u uint8 = 200
	u += 100
	var i int32 = 1 << 30
	i *= 2
	fmt.Println(x/y, x%y, x>>1, u, i, 1<<3/2, 7.0/2)
	run()
}
