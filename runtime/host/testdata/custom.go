//go:build ignore

package main

import (
	"math"

	"tally/blocks/channel"
	"tally/blocks/link"
	"tally/blocks/rng"
	"tally/blocks/stop"
	"tally/runtime/sim"
)

func main() {
	x := sim.New("custom blocks")
	x.Sweep("ebn0_db", 0, 2, 4, 6)
	x.Link(func(p sim.Point) *link.Link {
		var sym []complex128
		var hard []byte
		mod := link.Func("bpsk", func(f *link.Frame, r *rng.Stream) {
			sym = link.GrowComplex(sym, len(f.Coded))
			for i, b := range f.Coded {
				sym[i] = complex(1-2*float64(b), 0)
			}
			f.Samples = sym
			f.BitsPerSymbol = 1
			f.Real = true
			f.Symbols = len(sym)
		})
		dem := link.Func("slice", func(f *link.Frame, r *rng.Stream) {
			hard = link.GrowBytes(hard, len(f.Samples))
			for i, s := range f.Samples {
				if real(s) < 0 {
					hard[i] = 1
				} else {
					hard[i] = 0
				}
			}
			f.Hard = hard
		})
		var bits []byte
		src := link.Func("src", func(f *link.Frame, r *rng.Stream) {
			bits = link.GrowBytes(bits, 1024)
			r.Bits(bits)
			f.Bits, f.Coded = bits, bits
		})
		return link.Chain(src, mod, channel.AWGN(p.Get("ebn0_db")), dem)
	})
	x.Stop(stop.Errors(200), stop.Bits(1e6))
	x.Theory("bpsk", func(p sim.Point) float64 { return 0.5 * math.Erfc(math.Sqrt(math.Pow(10, p.Get("ebn0_db")/10))) })
	x.Run()
}
