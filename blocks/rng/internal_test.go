package rng

import (
	"math"
	"slices"
	"testing"
)

// The ziggurat's tables: r for 256 layers, the common layer area v, and the closure of the
// construction (256 layers of area v cover the area under exp(−x²/2), which is √(π/2)).
func TestZigguratTables(t *testing.T) {
	// r = 3.6541528853610088 and v = 0.00492867323399 for 256 layers: Marsaglia and Tsang,
	// "The Ziggurat Method for Generating Random Variables", J. Stat. Softw. 5(8), 2000
	// (from memory).
	if math.Abs(zigR-3.6541528853610088) > 1e-12 {
		t.Errorf("r = %.17g, want 3.6541528853610088", zigR)
	}
	v := zigR*gauss(zigR) + zigTail(zigR)
	if math.Abs(v-0.00492867323399) > 1e-13 {
		t.Errorf("v = %.17g, want 0.00492867323399", v)
	}
	// The top layer closes the stack: x_255·(1 − f(x_255)) = v.
	if top := zigX[zigLayers-1] * (1 - zigF[zigLayers-1]); math.Abs(top-v) > 1e-14 {
		t.Errorf("top layer area %.17g, want v = %.17g", top, v)
	}
	for i := 1; i < zigLayers; i++ {
		area := zigX[i] * (zigF[i+1] - zigF[i])
		if math.Abs(area-v) > 1e-14 {
			t.Fatalf("layer %d has area %.17g, want v = %.17g", i, area, v)
		}
		if zigF[i] != gauss(zigX[i]) && i > 1 && math.Abs(zigF[i]-gauss(zigX[i])) > 1e-15 {
			t.Fatalf("f(x_%d) = %g, table has %g", i, gauss(zigX[i]), zigF[i])
		}
	}
}

// draws returns n normal values from Norm on the stream with key k.
func draws(k uint64, n int) []float64 {
	s := New(k)
	z := make([]float64, n)
	for i := range z {
		z[i] = s.Norm()
	}
	return z
}

// Every filling call gives the values successive Norm calls would (the n-th normal of a
// stream depends on its key and n only), across chunk boundaries and from any position.
func TestFillsMatchNorm(t *testing.T) {
	for _, skip := range []int{0, 1, 77} {
		for _, n := range []int{0, 1, 2, 127, 128, 129, 255, 256, 257, 1000, 3000} {
			want := func(k uint64, m int) []float64 { return draws(k, skip+m)[skip:] }
			at := func(k uint64) *Stream {
				s := New(k)
				for range skip {
					s.Norm()
				}
				return s
			}
			const sigma = 0.75
			w := want(21, n)
			got := make([]float64, n)
			s := at(21)
			s.Normals(got, sigma)
			for i := range got {
				if got[i] != sigma*w[i] {
					t.Fatalf("skip %d, n %d: Normals[%d] = %v, want %v", skip, n, i, got[i], sigma*w[i])
				}
			}
			if s.Norm() != draws(21, skip+n+1)[skip+n] {
				t.Fatalf("skip %d, n %d: the stream is not left after the values Normals used", skip, n)
			}

			x := make([]complex128, n)
			for i := range x {
				x[i] = complex(float64(i), -float64(i))
			}
			y := slices.Clone(x)
			at(22).AddRealNoise(x, sigma)
			w = want(22, n)
			for i := range x {
				if x[i] != complex(real(y[i])+sigma*w[i], imag(y[i])) {
					t.Fatalf("skip %d, n %d: AddRealNoise[%d] = %v", skip, n, i, x[i])
				}
			}
			copy(x, y)
			at(23).AddImagNoise(x, sigma)
			w = want(23, n)
			for i := range x {
				if x[i] != complex(real(y[i]), imag(y[i])+sigma*w[i]) {
					t.Fatalf("skip %d, n %d: AddImagNoise[%d] = %v", skip, n, i, x[i])
				}
			}
			copy(x, y)
			at(24).AddNoise(x, sigma)
			w = want(24, 2*n)
			for i := range x {
				if x[i] != y[i]+complex(sigma*w[2*i], sigma*w[2*i+1]) {
					t.Fatalf("skip %d, n %d: AddNoise[%d] = %v, want %v", skip, n, i, x[i], y[i]+complex(sigma*w[2*i], sigma*w[2*i+1]))
				}
			}
		}
	}
}

// The frame-sized hot paths allocate nothing.
func TestNoAllocation(t *testing.T) {
	s := New(1)
	x := make([]complex128, 4096)
	z := make([]float64, 4096)
	b := make([]byte, 4096)
	for name, f := range map[string]func(){
		"AddNoise":     func() { s.AddNoise(x, 0.5) },
		"AddRealNoise": func() { s.AddRealNoise(x, 0.5) },
		"AddImagNoise": func() { s.AddImagNoise(x, 0.5) },
		"Normals":      func() { s.Normals(z, 0.5) },
		"Norm":         func() { z[0] = s.Norm() },
		"Bits":         func() { s.Bits(b) },
	} {
		if a := testing.AllocsPerRun(20, f); a != 0 {
			t.Errorf("%s allocates %v times per call", name, a)
		}
	}
}
