//go:build ignore

package main

import (
	"tally/blocks/channel"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/rng"
	"tally/blocks/source"
	"tally/blocks/stop"
	"tally/runtime/sim"
)

// Three receivers of one QPSK link on the same frames: a plain detector, the same detector
// after a block of the script's own that adds impulses (drawn by role "clicks"), and a
// detector with a small gain error inserted before it.
func main() {
	x := sim.New("paired receivers")
	x.Sweep("ebn0_db", 2, 5)
	x.Variants("receiver", "plain", "clicks", "gain")
	x.Link(func(p sim.Point) *link.Link {
		m := modem.QPSK()
		l := link.Chain(source.Random(1024), m.Mod(), channel.AWGN(p.Get("ebn0_db")))
		switch p.Label("receiver") {
		case "clicks":
			var b link.Block = link.Func("impulses", func(f *link.Frame, r *rng.Stream) {
				for i := range f.Samples {
					if r.Float64() < 0.002 {
						f.Samples[i] += complex(2*r.Norm(), 2*r.Norm())
					}
				}
			}).Draws("clicks")
			l.Add(b)
		case "gain":
			var b link.Block = link.Func("gain error", func(f *link.Frame, r *rng.Stream) {
				for i := range f.Samples {
					f.Samples[i] *= 0.93
				}
			})
			l.Add(b)
		}
		return l.Add(m.Demod())
	})
	x.Stop(stop.Shown(), stop.Bits(4e5))
	x.Run()
}
