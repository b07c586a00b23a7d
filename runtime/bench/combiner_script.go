//go:build ignore

// A custom block of tally bench: two receive antennas over independent Rayleigh fading, each
// with its own noise, combined by maximum ratio before a BPSK hard decision. The block is the
// script's own, written two ways: as a loop over the samples (every operation interpreted)
// and with the vector helpers of blocks/vec (the loop runs in compiled code). Both are the
// same link; they draw their random numbers in a different order, so they count different
// errors of the same BER. tally bench runs this file with the bit count of its case; tally run
// and go run run it as it stands.
package main

import (
	"fmt"
	"math"
	"math/cmplx"

	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/rng"
	"tally/blocks/source"
	"tally/blocks/stop"
	"tally/blocks/vec"
	"tally/runtime/sim"
)

const bits = 1e6 // bits per way of writing the block; tally bench replaces this line

const ebn0 = 10.0 // dB, average Eb/N0 per branch

// loop is the combiner written sample by sample.
func loop() link.Block {
	return link.Func("two antennas (loop)", func(f *link.Frame, r *rng.Stream) {
		f.MakeComplex(r)
		f.N0 = f.Es / f.EsN0(math.Pow(10, ebn0/10))
		sigma := math.Sqrt(f.N0 / 2)
		a := math.Sqrt(0.5) // E|g|² = 1
		for i, s := range f.Samples {
			g1 := complex(a*r.Norm(), a*r.Norm())
			g2 := complex(a*r.Norm(), a*r.Norm())
			y1 := g1*s + complex(sigma*r.Norm(), sigma*r.Norm())
			y2 := g2*s + complex(sigma*r.Norm(), sigma*r.Norm())
			p := real(g1)*real(g1) + imag(g1)*imag(g1) + real(g2)*real(g2) + imag(g2)*imag(g2)
			f.Samples[i] = (cmplx.Conj(g1)*y1 + cmplx.Conj(g2)*y2) / complex(p, 0)
		}
	})
}

// vector is the same combiner with the vector helpers; its buffers are grown once.
func vector() link.Block {
	var g1, g2, y1, y2 []complex128
	return link.Func("two antennas (vector)", func(f *link.Frame, r *rng.Stream) {
		f.MakeComplex(r)
		f.N0 = f.Es / f.EsN0(math.Pow(10, ebn0/10))
		sigma := math.Sqrt(f.N0 / 2)
		n := len(f.Samples)
		g1, g2 = link.GrowComplex(g1, n), link.GrowComplex(g2, n)
		y1, y2 = link.GrowComplex(y1, n), link.GrowComplex(y2, n)
		vec.Fill(g1, 0)
		r.AddNoise(g1, math.Sqrt(0.5))
		vec.Fill(g2, 0)
		r.AddNoise(g2, math.Sqrt(0.5))
		vec.Mul(y1, f.Samples, g1)
		r.AddNoise(y1, sigma)
		vec.Mul(y2, f.Samples, g2)
		r.AddNoise(y2, sigma)
		vec.Combine(f.Samples, y1, g1, y2, g2)
	})
}

func main() {
	x := sim.New("two-antenna combiner, a custom block two ways")
	x.SweepLabels("link", "combiner-loop", "combiner-vector")
	x.Link(func(p sim.Point) *link.Link {
		m := modem.BPSK()
		block := vector()
		if p.Label("link") == "combiner-loop" {
			block = loop()
		}
		return link.Chain(source.Random(8192), m.Mod(), block, m.Demod())
	})
	x.Stop(stop.Bits(bits))
	fmt.Println("running the links") // tally bench starts its CPU clock here
	x.Run()
}
