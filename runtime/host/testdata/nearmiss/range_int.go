//go:build ignore

// Ranging over an integer is valid since Go 1.22; the interpreter crashed on it (tally died
// with a trace of the interpreter). tally refuses it.
//
// prints: 012
// interpreter: 35:2: the interpreter cannot range over an integer
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
	for i := range 3 {
		fmt.Print(i)
	}
	fmt.Println()
	run()
}
