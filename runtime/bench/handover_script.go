//go:build ignore

// The custom-block case of tally bench -custom: BPSK received on two antennas over independent
// Rayleigh fading, combined by a block of the script's own, per sample — maximum-ratio
// combining or selection of the stronger branch. Every sample runs in the script's own code,
// so it runs at the interpreter's speed until the run is handed over to the compiled script.
package main

import (
	"math"

	"tally/blocks/link"
	"tally/blocks/rng"
	"tally/blocks/source"
	"tally/blocks/stop"
	"tally/runtime/sim"
)

const bits = 2e6 // bits per point; tally bench -custom-bits replaces this line

func main() {
	x := sim.New("Two-branch combining over Rayleigh fading")
	x.Sweep("ebn0_db", 0, 5, 10)
	x.SweepLabels("combiner", "MRC", "selection")
	x.Link(func(p sim.Point) *link.Link {
		ebn0 := math.Pow(10, p.Get("ebn0_db")/10)
		sigma := math.Sqrt(1 / (2 * ebn0)) // per dimension: Eb/N0 on each branch, Eb = 1, E|h|² = 1
		mrc := p.Label("combiner") == "MRC"
		var hard []byte
		comb := link.Func("combiner", func(f *link.Frame, r *rng.Stream) {
			hard = link.GrowBytes(hard, len(f.Coded))
			for i, b := range f.Coded {
				s := 1 - 2*float64(b)
				best, z := -1.0, 0.0
				for k := 0; k < 2; k++ {
					hr, hi := r.Norm()*math.Sqrt(0.5), r.Norm()*math.Sqrt(0.5)
					yr := hr*s + r.Norm()*sigma
					yi := hi*s + r.Norm()*sigma
					zk := hr*yr + hi*yi // Re(conj(h)·y): the branch's matched output
					if mrc {
						z += zk
					} else if g := hr*hr + hi*hi; g > best {
						best, z = g, zk
					}
				}
				hard[i] = 0
				if z < 0 {
					hard[i] = 1
				}
			}
			f.Hard = hard
		})
		return link.Chain(source.Random(4096), comb)
	})
	x.Stop(stop.Bits(bits))
	x.Run()
}
