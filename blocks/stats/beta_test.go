package stats

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"
)

// Exact 95 % Clopper–Pearson limits for k errors in n trials at sizes where gonum's own Beta
// quantile drifts (1e-3 relative at 1e12, wrong at 1e15): the binomial tail summed term by
// term in 50-digit arithmetic and solved by bisection (mpmath 1.3, computed for this test:
// low solves P(Bin(n, p) ≥ k) = 0.025, high P(Bin(n, p) ≥ k+1) = 0.975).
func TestLimitsAtLargeCounts(t *testing.T) {
	for _, c := range []struct{ n, k, low, high float64 }{
		{1e6, 10, 4.7953987775456e-6, 1.83902788912385e-5},
		{1e9, 1, 2.53178079839694e-11, 5.57164337820312e-9},
		{1e9, 100, 8.13639919683912e-8, 1.21626792477228e-7},
		{1e12, 1, 2.53178079842896e-14, 5.57164339092616e-12},
		{1e12, 1000, 9.38973018435877e-10, 1.06395213598228e-9},
		{1e15, 10, 4.79538869613244e-15, 1.83903560420177e-14},
		{1e15, 1000, 9.38973018407723e-13, 1.06395213601627e-12},
		{1e18, 10, 4.79538869613243e-18, 1.83903560420178e-17},
	} {
		e, err := ClopperPearson(int64(c.k), int64(c.n), 0.95)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(e.Low/c.low-1) > 1e-8 || math.Abs(e.High/c.high-1) > 1e-8 {
			t.Errorf("%g/%g: [%.15g, %.15g], want [%.15g, %.15g]", c.k, c.n, e.Low, e.High, c.low, c.high)
		}
	}
}

// The two limit forms used past bigBeta agree with gonum's Beta at a + b = 1e6, where gonum
// is still good (about 1e-10 relative), each over the range it is used for, to 1e-4
// standard deviations; past 1e6 they only get closer.
func TestBetaLimitFormsAgainstGonum(t *testing.T) {
	type form struct {
		quantile func(q, a, b float64) float64
		tail     func(x, a, b float64, upper bool) float64
	}
	gamma, normal := form{gammaBetaQuantile, gammaBetaTail}, form{normalBetaQuantile, normalBetaTail}
	for _, c := range []struct {
		a, b float64
		f    form
	}{
		{1, 1e6, gamma}, {10, 1e6, gamma}, {1000, 1e6, gamma}, {3162, 1e6, gamma},
		{3163, 1e6, normal}, {3e4, 9.7e5, normal}, {3e5, 7e5, normal},
	} {
		_, sd, _ := betaMoments(c.a, c.b)
		d := distuv.Beta{Alpha: c.a, Beta: c.b}
		for _, q := range []float64{0.005, 0.025, 0.5, 0.975, 0.995} {
			x := d.Quantile(q)
			if got := c.f.quantile(q, c.a, c.b); math.Abs(got-x) > 1e-4*sd {
				t.Errorf("Beta(%g, %g) %v-quantile %.12g, gonum %.12g (%.2g sd)", c.a, c.b, q, got, x, (got-x)/sd)
			}
			if lo, hi := c.f.tail(x, c.a, c.b, false), c.f.tail(x, c.a, c.b, true); math.Abs(lo-q) > 1e-4 || math.Abs(hi-(1-q)) > 1e-4 {
				t.Errorf("Beta(%g, %g) tails at the %v-quantile: %.8g and %.8g", c.a, c.b, q, lo, hi)
			}
		}
	}
}

// ln Γ(m+c) − ln Γ(m) against the direct difference where that is still exact enough.
func TestLgammaRatio(t *testing.T) {
	for _, c := range [][2]float64{{2e6, 1}, {2e6, 30}, {5e6, 1000.5}} {
		a, _ := math.Lgamma(c[0] + c[1])
		b, _ := math.Lgamma(c[0])
		if got := lgammaRatio(c[0], c[1]); math.Abs(got-(a-b)) > 1e-8*math.Abs(a-b) {
			t.Errorf("lgammaRatio(%g, %g) = %.15g, want %.15g", c[0], c[1], got, a-b)
		}
	}
	// ln Γ(m+1) − ln Γ(m) = ln m exactly.
	if got := lgammaRatio(1e15, 1); math.Abs(got-math.Log(1e15)) > 1e-12 {
		t.Errorf("lgammaRatio(1e15, 1) = %.15g, want ln 1e15 = %.15g", got, math.Log(1e15))
	}
}
