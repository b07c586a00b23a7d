package impair

import (
	"math"
	"math/cmplx"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"

	"tally/blocks/link"
	"tally/blocks/rng"
)

// ones is a frame of n unit samples at sps samples per symbol, so a block's output is its
// phasor.
func ones(n, sps int) *link.Frame {
	f := &link.Frame{SPS: sps, Es: 1, Samples: make([]complex128, n)}
	for i := range f.Samples {
		f.Samples[i] = 1
	}
	return f
}

// The phase increment of Wiener phase noise over one symbol is N(0, 2π·Δν·T) (Pfau, Hoffmann
// and Noé, "Hardware-efficient coherent digital receiver concept with feedforward carrier
// recovery for M-QAM constellations", J. Lightwave Technol., 2009, §II; from memory). The sample
// variance of n such increments, scaled by n/σ², is χ² with n degrees of freedom: the test
// uses its two-sided 99 % interval.
func TestWienerIncrementVariance(t *testing.T) {
	const lw = 2e-3 // Δν·T
	for _, sps := range []int{1, 4} {
		b := PhaseNoise(lw)
		var sum2 float64
		var n int
		for k := range 40 {
			f := ones(1024*sps, sps)
			if err := b.Process(f, rng.New(rng.Key(1, sps, k, 0))); err != nil {
				t.Fatal(err)
			}
			for i := sps; i < len(f.Samples); i += sps {
				d := cmplx.Phase(f.Samples[i] * cmplx.Conj(f.Samples[i-sps]))
				sum2 += d * d
				n++
			}
		}
		want := 2 * math.Pi * lw
		chi := distuv.ChiSquared{K: float64(n)}
		lo, hi := want*chi.Quantile(0.005)/float64(n), want*chi.Quantile(0.995)/float64(n)
		got := sum2 / float64(n) // the increments have mean zero
		if got < lo || got > hi {
			t.Errorf("SPS %d: increment variance %.4g, want %.4g (99 %% interval [%.4g, %.4g])", sps, got, want, lo, hi)
		}
		if math.Abs(b.Increment()-want) > 1e-15 {
			t.Errorf("Increment() = %v, want %v", b.Increment(), want)
		}
	}
}

// The default start is phase zero; RandomStart draws it uniformly. Rayleigh's test of
// uniformity on the circle: 2N·|mean e^{jθ}|² is χ² with 2 degrees of freedom for uniform θ
// (Mardia and Jupp, Directional Statistics, 2000, §6.3.1).
func TestWienerStart(t *testing.T) {
	f := ones(8, 1)
	if err := PhaseNoise(0.01).Process(f, rng.New(5)); err != nil {
		t.Fatal(err)
	}
	if f.Samples[0] != 1 {
		t.Errorf("default start: first sample %v, want 1", f.Samples[0])
	}
	const n = 2000
	var m complex128
	b := PhaseNoise(0.01).RandomStart()
	for k := range n {
		f := ones(1, 1)
		if err := b.Process(f, rng.New(rng.Key(2, 0, k, 0))); err != nil {
			t.Fatal(err)
		}
		m += f.Samples[0]
	}
	m /= n
	stat := 2 * n * real(m*cmplx.Conj(m))
	if q := (distuv.ChiSquared{K: 2}).Quantile(0.99); stat > q {
		t.Errorf("random start: Rayleigh statistic %.2f above the 99 %% point %.2f", stat, q)
	}
}

// A frequency offset advances the phase 2π·f·T per symbol whatever the samples per symbol
// (the definition of a normalised offset, common practice, no source).
func TestFrequencyPerSymbol(t *testing.T) {
	const ft = 0.013
	for _, sps := range []int{1, 3} {
		f := ones(100*sps, sps)
		if err := Frequency(ft).Process(f, rng.New(1)); err != nil {
			t.Fatal(err)
		}
		for i := sps; i < len(f.Samples); i += sps {
			d := cmplx.Phase(f.Samples[i] * cmplx.Conj(f.Samples[i-sps]))
			if math.Abs(d-2*math.Pi*ft) > 1e-9 {
				t.Fatalf("SPS %d: advance %v rad per symbol, want %v", sps, d, 2*math.Pi*ft)
			}
		}
	}
	f := ones(4, 1)
	if err := Phase(30).Process(f, rng.New(1)); err != nil {
		t.Fatal(err)
	}
	if d := cmplx.Phase(f.Samples[3]) * 180 / math.Pi; math.Abs(d-30) > 1e-12 {
		t.Errorf("Phase(30) rotates by %v degrees", d)
	}
}
