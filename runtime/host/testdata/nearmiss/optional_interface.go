//go:build ignore

// tally's compiled code asks a block for its name by a type assertion (link.NameOf and
// link.Named); a block the script defines with a Name method is named so by Go (it printed
// flipper), but the interpreter hands it over as a link.Block alone (it printed
// symbols._tally_blocks_link_Block). tally refuses the type.
//
// prints: flipper
// interpreter: 25:6: passed as link.Block it is not seen to be a link.Named too
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

func (b *flip) Name() string { return "flipper" }

func main() {
	var blk link.Block = &flip{every: 50}
	fmt.Println(link.NameOf(blk))
	x := sim.New("near miss")
	x.Sweep("ebn0_db", 2, 4)
	x.Link(func(p sim.Point) *link.Link { // a block object per link: workers share none
		m := modem.BPSK()
		return link.Chain(source.Random(200), m.Mod(), channel.AWGN(p.Get("ebn0_db")), m.Demod(), &flip{every: 50})
	})
	x.Stop(stop.Errors(20), stop.Bits(2e4))
	x.Run()
}
