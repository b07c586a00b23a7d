//go:build ignore

// A block the script defines, passed straight to link.Chain (a ...link.Block parameter), is
// valid Go; the interpreter failed while running ("reflect: cannot use *struct { Xevery int }
// as type link.Block in Call"). tally refuses it and says how to pass it.
//
// prints: every 50
// interpreter: 39:93: the interpreter cannot pass a flip straight to Chain's ...link.Block
package main

import (
	"fmt"

	"tally/blocks/channel"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/rng"
	"tally/blocks/source"
	"tally/blocks/stop"
	"tally/runtime/sim"
)

// flip inverts every n-th decision.
type flip struct{ every int }

func (b *flip) Process(f *link.Frame, r *rng.Stream) error {
	for i := 0; i < len(f.Hard); i += b.every {
		f.Hard[i] ^= 1
	}
	return nil
}

func main() {
	fmt.Println("every", 50)
	x := sim.New("near miss")
	x.Sweep("ebn0_db", 2, 4)
	x.Link(func(p sim.Point) *link.Link {
		m := modem.BPSK()
		return link.Chain(source.Random(200), m.Mod(), channel.AWGN(p.Get("ebn0_db")), m.Demod(), &flip{every: 50})
	})
	x.Stop(stop.Errors(20), stop.Bits(2e4))
	x.Run()
}
