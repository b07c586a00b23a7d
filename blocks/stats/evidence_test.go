package stats_test

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
	"gonum.org/v1/gonum/stat/distuv"

	"tally/blocks/stats"
)

// mixture is M by quadrature of its definition (gonum quad): the likelihood ratio of q to t
// averaged over the Beta(1, 1/t) prior cut to the claimed side.
func mixture(k, n, t float64, below bool) float64 {
	prior := distuv.Beta{Alpha: 1, Beta: 1 / t}
	f := func(q float64) float64 {
		return math.Exp(k*math.Log(q/t)+(n-k)*(math.Log1p(-q)-math.Log1p(-t))) * prior.Prob(q)
	}
	if below {
		return quad.Fixed(f, 0, t, 4000, nil, 0) / prior.CDF(t)
	}
	// The prior's mass lies within a few t above t: split there, and cut the tail past
	// 800·t, where it is below e⁻⁸⁰⁰.
	mid, end := math.Min(1, 40*t), math.Min(1, 800*t)
	s := quad.Fixed(f, t, mid, 4000, nil, 0)
	if mid < end {
		s += quad.Fixed(f, mid, end, 4000, nil, 0)
	}
	return s / prior.Survival(t)
}

func TestEvidenceClosedForm(t *testing.T) {
	for _, c := range []struct {
		k, n   int64
		target float64
		below  bool
	}{
		{0, 100, 0.02, true}, {1, 300, 0.02, true}, {3, 2000, 0.005, true},
		{6, 100, 0.02, false}, {20, 5000, 0.001, false}, {2, 50, 0.05, false},
	} {
		got := stats.Evidence(c.k, c.n, c.target, c.below)
		want := math.Log(mixture(float64(c.k), float64(c.n), c.target, c.below))
		if math.Abs(got-want) > 1e-6 {
			t.Errorf("%+v: ln M = %.9g, quadrature %.9g", c, got, want)
		}
	}
}

// For a small target and many trials the mixture has a Poisson form of its own, derived
// apart from the code: with μ = n·t and θ = q/t under the Exp(1) limit of the prior,
// M_below = e^μ·Γ(k+1)·P(k+1, μ+1) / ((μ+1)^(k+1)·(1 − 1/e)) and M_above the same with the
// upper regularised gamma Q and 1/e for 1 − 1/e.
func TestEvidencePoissonLimit(t *testing.T) {
	const target = 1e-12
	for _, c := range []struct {
		k int64
		n float64
	}{{0, 4e12}, {1, 8e12}, {10, 3e12}, {100, 1.5e14}, {100, 4e13}} {
		mu := c.n * target
		lg, _ := math.Lgamma(float64(c.k) + 1)
		g := distuv.Gamma{Alpha: float64(c.k) + 1, Beta: 1}
		base := mu + lg - float64(c.k+1)*math.Log(mu+1)
		below := base + math.Log(g.CDF(mu+1)) - math.Log(1-1/math.E)
		above := base + math.Log(g.Survival(mu+1)) + 1
		if got := stats.Evidence(c.k, int64(c.n), target, true); math.Abs(got-below) > 1e-6 {
			t.Errorf("below, %d in %g: %.9g, Poisson form %.9g", c.k, c.n, got, below)
		}
		if got := stats.Evidence(c.k, int64(c.n), target, false); math.Abs(got-above) > 1e-6 {
			t.Errorf("above, %d in %g: %.9g, Poisson form %.9g", c.k, c.n, got, above)
		}
	}
}

func TestEvidenceEdges(t *testing.T) {
	if e := stats.Evidence(0, 0, 1e-3, true); e != 0 {
		t.Errorf("no trials: %g, want 0", e)
	}
	for _, c := range [][3]float64{{1, 10, 0}, {1, 10, 1}, {1, 10, math.NaN()}, {11, 10, 0.1}, {-1, 10, 0.1}} {
		if e := stats.Evidence(int64(c[0]), int64(c[1]), c[2], true); !math.IsNaN(e) {
			t.Errorf("Evidence(%v) = %g, want NaN", c, e)
		}
	}
}

// Counts far on the other side of the target give no evidence for the claimed side: with
// 3207 errors in 151 040 trials (2.1 %), the evidence for a rate below 1 % is at most 0 (for
// every q below the target the likelihood ratio against the target is at most 1 when the
// observed rate lies above it; common practice, no source). The incomplete beta routine
// once returned a subnormal tail there and the evidence read +14.7.
func TestEvidenceFarOnTheOtherSide(t *testing.T) {
	if e := stats.Evidence(3207, 151040, 0.01, true); e > 0 {
		t.Errorf("below: evidence %g with the rate at twice the target", e)
	}
	if e := stats.Evidence(700, 151040, 0.01, false); e > 0 {
		t.Errorf("above: evidence %g with the rate at half the target", e)
	}
}
