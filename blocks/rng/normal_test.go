package rng_test

import (
	"math"
	"slices"
	"testing"

	"gonum.org/v1/gonum/stat"
	"gonum.org/v1/gonum/stat/distuv"

	"tally/blocks/rng"
	"tally/blocks/stats"
)

// The sample moments of 10⁶ values against N(0, 1): mean 0, variance 1, skewness 0, excess
// kurtosis 0, each within 4.5 standard errors (√(1/n), √(2/n), √(6/n), √(24/n); common
// practice, no source).
// draws returns n normal values from Norm on the stream with key k.
func draws(k uint64, n int) []float64 {
	s := rng.New(k)
	z := make([]float64, n)
	for i := range z {
		z[i] = s.Norm()
	}
	return z
}

func TestNormMoments(t *testing.T) {
	const n = 1_000_000
	z := draws(11, n)
	mean, sd := stat.MeanStdDev(z, nil)
	checks := []struct {
		name      string
		got, want float64
		se        float64
	}{
		{"mean", mean, 0, math.Sqrt(1.0 / n)},
		{"variance", sd * sd, 1, math.Sqrt(2.0 / n)},
		{"skewness", stat.Skew(z, nil), 0, math.Sqrt(6.0 / n)},
		{"excess kurtosis", stat.ExKurtosis(z, nil), 0, math.Sqrt(24.0 / n)},
	}
	for _, c := range checks {
		if math.Abs(c.got-c.want) > 4.5*c.se {
			t.Errorf("%s = %.5f, want %g ± %.5f", c.name, c.got, c.want, 4.5*c.se)
		}
	}
}

// The shape: a chi-square test on 1000 bins of equal normal probability (edges from
// distuv.UnitNormal.Quantile), fine enough to see a wrong layer or wedge, and a
// Kolmogorov–Smirnov test against distuv.UnitNormal.CDF.
func TestNormShape(t *testing.T) {
	const n, bins = 2_000_000, 1000
	z := draws(12, n)
	edges := make([]float64, bins-1)
	for i := range edges {
		edges[i] = distuv.UnitNormal.Quantile(float64(i+1) / bins)
	}
	count := make([]float64, bins)
	for _, v := range z {
		i, _ := slices.BinarySearch(edges, v)
		count[i]++
	}
	var chi2 float64
	e := float64(n) / bins
	for _, c := range count {
		chi2 += (c - e) * (c - e) / e
	}
	if q := (distuv.ChiSquared{K: bins - 1}).Quantile(0.999); chi2 > q {
		t.Errorf("chi-square = %.1f on %d degrees of freedom, above the 0.999 quantile %.1f", chi2, bins-1, q)
	}

	slices.Sort(z[:200_000])
	if d := ksStat(z[:200_000], distuv.UnitNormal.CDF); d > ksCrit99 {
		t.Errorf("Kolmogorov–Smirnov √n·D = %.3f, above the 0.99 critical value %.3f", d, ksCrit99)
	}
}

// ksCrit99 is the 0.99 quantile of the Kolmogorov distribution, the limit of √n·D
// (Kolmogorov, 1933; 1.628, from memory).
const ksCrit99 = 1.628

// ksStat is √n times the largest distance between the empirical distribution of the sorted
// sample x and cdf.
func ksStat(x []float64, cdf func(float64) float64) float64 {
	n := float64(len(x))
	var d float64
	for i, v := range x {
		f := cdf(v)
		d = max(d, f-float64(i)/n, float64(i+1)/n-f)
	}
	return d * math.Sqrt(n)
}

// The tails: P(|z| > t) against 2Q(t) = erfc(t/√2) (math.Erfc) at t = 3 (in the layers), r
// (where the tail algorithm starts) and 4 (in the tail), each within a 99 % Clopper–Pearson
// interval of the count in 4·10⁶ values.
func TestNormTails(t *testing.T) {
	const n = 4_000_000
	ts := []float64{3, rng.ZigR(), 4}
	count := make([]int64, len(ts))
	s := rng.New(13)
	for range n {
		z := math.Abs(s.Norm())
		for i, th := range ts {
			if z > th {
				count[i]++
			}
		}
	}
	for i, th := range ts {
		p := math.Erfc(th / math.Sqrt2)
		ci, err := stats.ClopperPearson(count[i], n, 0.99)
		if err != nil {
			t.Fatal(err)
		}
		if !ci.Contains(p) {
			t.Errorf("P(|z| > %.3f) = %d/%d, 99%% interval [%.3g, %.3g] misses 2Q = %.4g", th, count[i], n, ci.Low, ci.High, p)
		}
	}
}

// The tail algorithm alone, fed draws that pick the base layer beyond its core: its values
// must follow N(0, 1) conditioned on |z| > r, P(|z| > t | |z| > r) = Q(t)/Q(r), checked by
// Kolmogorov–Smirnov against distuv.UnitNormal.Survival and by the count beyond 5.
func TestNormTailAlgorithm(t *testing.T) {
	const n = 200_000
	s := rng.New(14)
	z := make([]float64, n)
	qr := distuv.UnitNormal.Survival(rng.ZigR())
	var beyond5 int64
	for i := range z {
		// Layer 0, a point past the core (m ≥ rng.ZigK0()), either sign.
		m := rng.ZigK0() + s.Uint64()%(1<<rng.ZigBits-rng.ZigK0())
		u := m<<(64-rng.ZigBits) | (s.Uint64()&1)<<8
		z[i] = math.Abs(rng.SlowNormal(14, uint64(i), u))
		if z[i] <= rng.ZigR() {
			t.Fatalf("tail value %g not beyond r = %g", z[i], rng.ZigR())
		}
		if z[i] > 5 {
			beyond5++
		}
	}
	slices.Sort(z)
	cdf := func(x float64) float64 { return 1 - distuv.UnitNormal.Survival(x)/qr }
	if d := ksStat(z, cdf); d > ksCrit99 {
		t.Errorf("tail: Kolmogorov–Smirnov √n·D = %.3f, above %.3f", d, ksCrit99)
	}
	ci, _ := stats.ClopperPearson(beyond5, n, 0.99)
	if p := distuv.UnitNormal.Survival(5) / qr; !ci.Contains(p) {
		t.Errorf("tail: P(z > 5 | z > r) = %d/%d, interval [%.3g, %.3g] misses Q(5)/Q(r) = %.3g", beyond5, n, ci.Low, ci.High, p)
	}
}

// Noise through the fast filling loops: BPSK (+1) with real noise of σ² = N0/2 is decided
// wrong with probability ½ erfc(√(Eb/N0)) (e.g. Proakis, Digital Communications, 4th ed.,
// 2001, eq. 5-2-5); the count must fall in its 99 % Clopper–Pearson interval.
func TestNoiseBER(t *testing.T) {
	const frames, size = 100, 10_000
	for _, db := range []float64{0, 4, 8} {
		ebn0 := math.Pow(10, db/10)
		sigma := math.Sqrt(1 / ebn0 / 2)
		x := make([]complex128, size)
		var re, im int64
		for f := range frames {
			for i := range x {
				x[i] = 1 + 1i
			}
			s := rng.New(rng.Key(15, int(db), f, 0))
			s.AddNoise(x, sigma)
			for _, v := range x {
				if real(v) < 0 {
					re++
				}
				if imag(v) < 0 {
					im++
				}
			}
		}
		p := 0.5 * math.Erfc(math.Sqrt(ebn0))
		for _, c := range []struct {
			part string
			k    int64
		}{{"real", re}, {"imaginary", im}} {
			ci, _ := stats.ClopperPearson(c.k, frames*size, 0.99)
			if !ci.Contains(p) {
				t.Errorf("%g dB, %s part: %d errors in %d, interval [%.3g, %.3g] misses %.4g", db, c.part, c.k, frames*size, ci.Low, ci.High, p)
			}
		}
	}
}
