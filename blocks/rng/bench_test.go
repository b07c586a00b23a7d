package rng

import (
	"math/rand/v2"
	"testing"
)

// The hot paths of a link, 4096 values per op ("MB/s" reads as millions of values per
// second); compare BenchmarkStdNormFloat64 and BenchmarkRandNormFloat64.

const benchN = 4096

func BenchmarkNorm(b *testing.B) {
	s := New(1)
	var sum float64
	b.SetBytes(benchN)
	for b.Loop() {
		for range benchN {
			sum += s.Norm()
		}
	}
	_ = sum
}

func BenchmarkNormals(b *testing.B) {
	s := New(1)
	x := make([]float64, benchN)
	b.SetBytes(benchN)
	for b.Loop() {
		s.Normals(x, 0.5)
	}
}

func BenchmarkAddRealNoise(b *testing.B) {
	s := New(1)
	x := make([]complex128, benchN)
	b.SetBytes(benchN)
	for b.Loop() {
		s.AddRealNoise(x, 0.5)
	}
}

func BenchmarkAddNoise(b *testing.B) {
	s := New(1)
	x := make([]complex128, benchN)
	b.SetBytes(benchN)
	for b.Loop() {
		s.AddNoise(x, 0.5)
	}
}

func BenchmarkBits(b *testing.B) {
	s := New(1)
	x := make([]byte, benchN)
	b.SetBytes(benchN)
	for b.Loop() {
		s.Bits(x)
	}
}

// BenchmarkStdNormFloat64 is the standard library's ziggurat over PCG, the usual way to draw
// normals in Go, for comparison with BenchmarkNormals.
func BenchmarkStdNormFloat64(b *testing.B) {
	r := rand.New(rand.NewPCG(1, 2))
	x := make([]float64, benchN)
	b.SetBytes(benchN)
	for b.Loop() {
		for i := range x {
			x[i] = 0.5 * r.NormFloat64()
		}
	}
}

// BenchmarkRandNormFloat64 is the standard library's NormFloat64 drawing from a Stream
// through Rand (an interface call per draw), tally's normal generator before the ziggurat.
func BenchmarkRandNormFloat64(b *testing.B) {
	r := New(1).Rand()
	x := make([]float64, benchN)
	b.SetBytes(benchN)
	for b.Loop() {
		for i := range x {
			x[i] = 0.5 * r.NormFloat64()
		}
	}
}
