package theory_test

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
	"gonum.org/v1/gonum/stat/distuv"

	"tally/blocks/theory"
)

// biawgnDirect computes C and V of the BPSK-input AWGN channel from their definitions in the
// received value y (Gaussian densities from gonum, Legendre quadrature over ±(1 + 40σ)), a
// path independent of the package's LLR form and Hermite rule.
func biawgnDirect(esn0 float64) (c, v float64) {
	sigma := math.Sqrt(1 / (2 * esn0))
	p := distuv.Normal{Mu: 1, Sigma: sigma}
	m := distuv.Normal{Mu: -1, Sigma: sigma}
	dens := func(y float64) float64 {
		a, b := p.LogProb(y), m.LogProb(y)
		return math.Log2(2) - (math.Max(a, b)+math.Log1p(math.Exp(-math.Abs(a-b))))/math.Ln2 + a/math.Ln2
	}
	w := 1 + 40*sigma
	c = quad.Fixed(func(y float64) float64 { return p.Prob(y) * dens(y) }, -w, w, 4000, quad.Legendre{}, 0)
	s2 := quad.Fixed(func(y float64) float64 { d := dens(y); return p.Prob(y) * d * d }, -w, w, 4000, quad.Legendre{}, 0)
	return c, s2 - c*c
}

func TestBIAWGNAgainstDefinition(t *testing.T) {
	for _, db := range []float64{-10, -3, 0, 2, 5, 8} {
		c, v := biawgnDirect(theory.FromDB(db))
		if got := theory.BIAWGNCapacity(db); math.Abs(got-c) > 1e-12 {
			t.Errorf("C(%v dB) = %.12f, direct integration %.12f", db, got, c)
		}
		if got := theory.BIAWGNDispersion(db); math.Abs(got-v) > 1e-12 {
			t.Errorf("V(%v dB) = %.12f, direct integration %.12f", db, got, v)
		}
	}
}

func TestBIAWGNPublishedThresholds(t *testing.T) {
	// Richardson and Urbanke, Modern Coding Theory, 2008, §4.4 (from memory): the Shannon
	// threshold of rate 1/2 on the BAWGN channel is σ = 0.9787 (noise standard deviation for ±1
	// symbols), i.e. Eb/N0 = 1/(2Rσ²) = 0.187 dB, the figure usually quoted for rate 1/2.
	sigma := 0.9787
	es := theory.ToDB(1 / (2 * sigma * sigma))
	if c := theory.BIAWGNCapacity(es); math.Abs(c-0.5) > 5e-4 {
		t.Errorf("C at σ = 0.9787 is %.5f, want 0.5", c)
	}
	if got := theory.ShannonLimit(0.5); math.Abs(got-0.187) > 0.005 {
		t.Errorf("Shannon limit of rate 1/2: %.4f dB, want 0.187", got)
	}
	// As the rate falls to 0 the limit falls to ln 2 = −1.59 dB (Shannon, 1948; every textbook).
	if got, want := theory.ShannonLimit(1e-4), theory.ToDB(math.Ln2); math.Abs(got-want) > 0.01 {
		t.Errorf("Shannon limit of rate 1e-4: %.4f dB, want %.4f", got, want)
	}
	if !math.IsNaN(theory.ShannonLimit(1)) || !math.IsNaN(theory.NormalApprox(0, 1, 1)) {
		t.Error("bad arguments did not give NaN")
	}
}

func TestBIAWGNLowSNRMatchesGaussianInput(t *testing.T) {
	// At low SNR binary input loses nothing to second order: C and V approach those of the
	// Gaussian-input AWGN channel, C = ½ log2(1 + P) and V = P(P + 2)/(2(P + 1)²) log2²e with
	// P = 2Es/N0 (Polyanskiy, Poor and Verdú 2010, Theorem 54, the AWGN dispersion).
	es := 1e-3
	P := 2 * es
	cg := 0.5 * math.Log2(1+P)
	vg := P * (P + 2) / (2 * (P + 1) * (P + 1)) * math.Log2E * math.Log2E
	db := theory.ToDB(es)
	if c := theory.BIAWGNCapacity(db); math.Abs(c/cg-1) > 2e-3 {
		t.Errorf("C = %g, Gaussian input %g", c, cg)
	}
	if v := theory.BIAWGNDispersion(db); math.Abs(v/vg-1) > 5e-3 {
		t.Errorf("V = %g, Gaussian input %g", v, vg)
	}
	// Binary input never beats Gaussian input.
	for _, db := range []float64{-5, 0, 3, 6, 10} {
		if c, g := theory.BIAWGNCapacity(db), 0.5*math.Log2(1+2*theory.FromDB(db)); c > g {
			t.Errorf("%v dB: binary-input C %g above Gaussian-input %g", db, c, g)
		}
	}
}

func TestNormalApproxShape(t *testing.T) {
	// The normal approximation inverts to log2 M = nC − √(nV) Q⁻¹(ε) + ½ log2 n (Polyanskiy,
	// Poor and Verdú 2010): the FER it gives must reproduce k.
	n, k := 1024, 512
	for _, db := range []float64{0.5, 1, 1.5, 2} {
		eps := theory.NormalApprox(n, k, db)
		es := db + theory.ToDB(float64(k)/float64(n))
		c, v := theory.BIAWGNCapacity(es), theory.BIAWGNDispersion(es)
		logM := float64(n)*c - math.Sqrt(float64(n)*v)*theory.QInv(eps) + 0.5*math.Log2(float64(n))
		if math.Abs(logM-float64(k)) > 1e-6 {
			t.Errorf("%v dB: ε = %g gives log2 M = %.6f, want %d", db, eps, logM, k)
		}
	}
	// Above the Shannon limit a longer code does better; below it, worse (the finite-length
	// penalty shrinks as 1/√n). Common practice, no source.
	if a, b := theory.NormalApprox(1000, 500, 1.5), theory.NormalApprox(10000, 5000, 1.5); !(b < a) {
		t.Errorf("at 1.5 dB n = 10000 gives %g, not below n = 1000's %g", b, a)
	}
	if a, b := theory.NormalApprox(1000, 500, -0.5), theory.NormalApprox(10000, 5000, -0.5); !(b > a) {
		t.Errorf("at −0.5 dB n = 10000 gives %g, not above n = 1000's %g", b, a)
	}
}
