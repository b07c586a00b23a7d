//go:build ignore

// A small generic helper, which both ways run alike.
//
// prints: 3 2.5 3.5 3
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

func maxOf[T int | float64](a, b T) T {
	if a > b {
		return a
	}
	return b
}

func sum[T int | float64](xs []T) T {
	var s T
	for _, x := range xs {
		s += x
	}
	return s
}

func main() {
	fmt.Println(maxOf(2, 3), maxOf(2.5, 1.0), sum([]float64{1, 2.5}), sum([]int{1, 2}))
	run()
}
