//go:build ignore

// The err inside the if is a new variable that shadows the outer one and is never used: go
// run refuses it; tally used to run the script and print <nil>.
//
// compiler: 37:6: declared and not used: err
package main

import (
	"fmt"
	"strconv"

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
	var err error
	if true {
		n, err := strconv.Atoi("x")
		_ = n
	}
	fmt.Println(err)
	run()
}
