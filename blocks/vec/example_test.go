package vec_test

import (
	"fmt"
	"math"

	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/rng"
	"tally/blocks/source"
	"tally/blocks/vec"
)

// A custom block written with the helpers: two receive antennas over independent Rayleigh
// fading, each with its own noise, combined by maximum ratio. Every line works on the whole
// frame, so the block runs at compiled speed in a script too. Its buffers live in the
// closure and are grown once: no allocation per frame.
func Example() {
	const ebn0 = 10.0 // dB, average per branch
	var g1, g2, y1, y2 []complex128
	twoAntennas := link.Func("two antennas", func(f *link.Frame, r *rng.Stream) {
		f.MakeComplex(r)
		n := len(f.Samples)
		g1, g2 = link.GrowComplex(g1, n), link.GrowComplex(g2, n)
		y1, y2 = link.GrowComplex(y1, n), link.GrowComplex(y2, n)
		vec.Fill(g1, 0)
		r.AddNoise(g1, math.Sqrt(0.5)) // Rayleigh gains, E|g|² = 1
		vec.Fill(g2, 0)
		r.AddNoise(g2, math.Sqrt(0.5))
		f.N0 = f.Es / f.EsN0(math.Pow(10, ebn0/10))
		sigma := math.Sqrt(f.N0 / 2)
		vec.Mul(y1, f.Samples, g1)
		r.AddNoise(y1, sigma)
		vec.Mul(y2, f.Samples, g2)
		r.AddNoise(y2, sigma)
		vec.Combine(f.Samples, y1, g1, y2, g2)
	})
	m := modem.BPSK()
	l := link.Chain(source.Random(8192), m.Mod(), twoAntennas, m.Demod())
	counts := make([]link.Tally, len(l.Taps()))
	var f link.Frame
	for i := range 20 {
		if err := l.Run(&f, 1, 0, i, counts); err != nil {
			fmt.Println(err)
		}
	}
	ber := float64(counts[0].Errors) / float64(counts[0].Trials)
	// BPSK with two-branch maximum-ratio combining in Rayleigh fading, average Eb/N0 γ per
	// branch: Pb = ((1−μ)/2)²·(1 + 2·(1+μ)/2), μ = √(γ/(1+γ)) (Proakis, Digital
	// Communications, 4th ed., 2001, eq. 14.4-15 with L = 2).
	g := math.Pow(10, ebn0/10)
	mu := math.Sqrt(g / (1 + g))
	pb := math.Pow((1-mu)/2, 2) * (1 + (1 + mu))
	fmt.Printf("%d errors in %d bits: BER %.1e (theory %.1e)\n", counts[0].Errors, counts[0].Trials, ber, pb)
	// Output: 253 errors in 163840 bits: BER 1.5e-03 (theory 1.6e-03)
}

// Clip limits the magnitude and keeps the phase.
func ExampleClip() {
	x := []complex128{0.5, 3i, complex(3, 4)}
	vec.Clip(x, x, 1)
	fmt.Printf("%.2f\n", x)
	// Output: [(0.50+0.00i) (0.00+1.00i) (0.60+0.80i)]
}

// Ramp applies a frequency offset: here a quarter turn per sample.
func ExampleRamp() {
	x := []complex128{1, 1, 1, 1}
	vec.Ramp(x, x, 0, math.Pi/2)
	fmt.Printf("%.0f\n", x)
	// Output: [(1+0i) (0+1i) (-1+0i) (-0-1i)]
}

// FIR filters from an empty state, in place here: a two-tap average.
func ExampleFIR() {
	x := []complex128{2, 4, 6, 8}
	vec.FIR(x, x, []complex128{0.5, 0.5})
	fmt.Println(x)
	// Output: [(1+0i) (3+0i) (5+0i) (7+0i)]
}

// Selection combining by mask: the branch with the larger power at each sample.
func ExampleSelect() {
	a := []complex128{1, 2, 3}
	b := []complex128{-1, -2, -3}
	pa, pb := []float64{0.9, 0.1, 0.5}, []float64{0.2, 0.4, 0.6}
	mask := make([]byte, 3)
	vec.Greater(mask, pa, pb)
	dst := make([]complex128, 3)
	vec.Select(dst, mask, a, b)
	fmt.Println(mask, dst)
	// Output: [1 0 0] [(1+0i) (-2+0i) (-3+0i)]
}

// Combine weighs two branches by their conjugate gains: without noise it returns the sent
// samples.
func ExampleCombine() {
	s := []complex128{1, -1}
	g1 := []complex128{complex(0.3, 0.4), 2i}
	g2 := []complex128{1, complex(0, -0.5)}
	y1, y2 := make([]complex128, 2), make([]complex128, 2)
	vec.Mul(y1, s, g1)
	vec.Mul(y2, s, g2)
	vec.Combine(y1, y1, g1, y2, g2)
	fmt.Printf("%.3f\n", y1)
	// Output: [(1.000+0.000i) (-1.000+0.000i)]
}

// Sums and norms of a frame's samples.
func ExampleEnergy() {
	x := []complex128{complex(3, 4), 1i}
	fmt.Println(vec.Energy(x), vec.Norm(x), vec.MeanPower(x), vec.Sum(x), vec.Dot(x, x))
	// Output: 26 5.0990195135927845 13 (3+5i) (26+0i)
}
