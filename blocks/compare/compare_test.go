package compare

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"
)

// Fisher's tea-tasting experiment: 8 cups, 4 with milk poured first; the lady names 4 cups as
// milk-first and gets 3 right. Two-sided P = 34/70 (Fisher, The Design of Experiments, 1935,
// ch. 2; Agresti, Categorical Data Analysis, 2nd ed. 2002, §3.5.2 and Table 3.8: P = 0.486).
// All four right gives 2/70 two-sided (1/70 one-sided, Fisher's figure).
func TestProportionsTeaTasting(t *testing.T) {
	for _, c := range []struct {
		k1, n1, k2, n2 int64
		want           float64
	}{
		{3, 4, 1, 4, 34.0 / 70},
		{4, 4, 0, 4, 2.0 / 70},
		{2, 4, 2, 4, 1},
	} {
		r, err := Proportions(c.k1, c.n1, c.k2, c.n2)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(r.P-c.want) > 1e-12 {
			t.Errorf("Proportions(%d/%d, %d/%d): p = %.15g, want %.15g", c.k1, c.n1, c.k2, c.n2, r.P, c.want)
		}
	}
}

// hyper is the hypergeometric probability from the standard library's log-gamma.
func hyper(x, k, n1, n2 int64) float64 {
	lc := func(n, r int64) float64 {
		a, _ := math.Lgamma(float64(n + 1))
		b, _ := math.Lgamma(float64(r + 1))
		c, _ := math.Lgamma(float64(n - r + 1))
		return a - b - c
	}
	return math.Exp(lc(k, x) + lc(n1+n2-k, n1-x) - lc(n1+n2, n1))
}

// The recursion against the hypergeometric law written out with math.Lgamma, on small tables
// where that is accurate, with the same minimum-likelihood rule.
func TestProportionsAgainstLgamma(t *testing.T) {
	for _, c := range [][4]int64{{7, 30, 12, 20}, {0, 50, 5, 60}, {9, 40, 1, 25}, {15, 15, 3, 40}} {
		k1, n1, k2, n2 := c[0], c[1], c[2], c[3]
		k := k1 + k2
		obs := hyper(k1, k, n1, n2)
		var want float64
		for x := max(0, k-n2); x <= min(k, n1); x++ {
			if p := hyper(x, k, n1, n2); p <= obs*(1+1e-7) {
				want += p
			}
		}
		r, _ := Proportions(k1, n1, k2, n2)
		if math.Abs(r.P-want) > 1e-9*math.Max(want, 1e-300)+1e-14 {
			t.Errorf("Proportions(%v): p = %.12g, lgamma reference %.12g", c, r.P, want)
		}
	}
}

// The Poisson conditional test against gonum's binomial probabilities summed by the same rule.
func TestRatesAgainstGonumBinomial(t *testing.T) {
	for _, c := range []struct {
		k1, k2 int64
		t1, t2 float64
	}{{3, 11, 1e6, 2e6}, {0, 10, 5e5, 5e5}, {40, 15, 2.801e4, 1.9017e4}, {100, 130, 1e9, 1.2e9}} {
		k := c.k1 + c.k2
		b := distuv.Binomial{N: float64(k), P: c.t1 / (c.t1 + c.t2)}
		obs := b.Prob(float64(c.k1))
		var want float64
		for x := int64(0); x <= k; x++ {
			if p := b.Prob(float64(x)); p <= obs*(1+1e-7) {
				want += p
			}
		}
		r, err := Rates(c.k1, c.t1, c.k2, c.t2)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(r.P-want) > 1e-9*want+1e-14 {
			t.Errorf("Rates(%d/%g, %d/%g): p = %.12g, gonum reference %.12g", c.k1, c.t1, c.k2, c.t2, r.P, want)
		}
	}
	// Equal exposures, all 10 events in one sample: P = 2·2⁻¹⁰ (from the definition).
	if r, _ := Rates(0, 1, 10, 1); math.Abs(r.P-2.0/1024) > 1e-15 {
		t.Errorf("Rates(0, 10): p = %g, want 2/1024", r.P)
	}
}

// With 10⁹ trials and a handful of errors the hypergeometric law is the binomial one to many
// digits (the Poisson limit; common practice, no source), so the two tests agree.
func TestProportionsTendToRates(t *testing.T) {
	for _, c := range [][4]int64{{120, 1e9, 160, 1e9}, {30, 4e8, 51, 6e8}, {0, 1e9, 7, 1e9}} {
		a, _ := Proportions(c[0], c[1], c[2], c[3])
		b, _ := Rates(c[0], float64(c[1]), c[2], float64(c[3]))
		if math.Abs(a.P-b.P) > 1e-6*b.P {
			t.Errorf("%v: Fisher p = %.9g, Poisson-conditional p = %.9g", c, a.P, b.P)
		}
	}
}

// An exact conditional test never rejects a true null more often than its level (the size of
// Fisher's test is at most α; Lehmann and Romano, Testing Statistical Hypotheses, 2005, §4.5).
// Equal BERs drawn from gonum's binomial with a fixed seed: the rejection rate stays at or
// below α within a 99 % Monte Carlo margin.
func TestProportionsSize(t *testing.T) {
	src := rand.New(rand.NewPCG(1, 2))
	b1 := distuv.Binomial{N: 200000, P: 3e-4, Src: src}
	b2 := distuv.Binomial{N: 300000, P: 3e-4, Src: src}
	const trials, alpha = 4000, 0.05
	var reject int
	for range trials {
		r, err := Proportions(int64(b1.Rand()), 200000, int64(b2.Rand()), 300000)
		if err != nil {
			t.Fatal(err)
		}
		if r.Significant(alpha) {
			reject++
		}
	}
	rate := float64(reject) / trials
	if margin := 2.58 * math.Sqrt(alpha*(1-alpha)/trials); rate > alpha+margin {
		t.Errorf("rejection rate under the null %.4f exceeds α = %g", rate, alpha)
	}
	// And it does reject a BER 1.5 times larger most of the time: the test is not vacuous.
	b2.P = 4.5e-4
	reject = 0
	for range 400 {
		if r, _ := Proportions(int64(b1.Rand()), 200000, int64(b2.Rand()), 300000); r.Significant(alpha) {
			reject++
		}
	}
	if reject < 300 {
		t.Errorf("only %d of 400 rejections for a 1.5× BER", reject)
	}
}

func TestBadCounts(t *testing.T) {
	for _, c := range [][4]int64{{-1, 10, 0, 10}, {11, 10, 0, 10}, {0, 0, 1, 10}} {
		if _, err := Proportions(c[0], c[1], c[2], c[3]); err == nil {
			t.Errorf("Proportions(%v): no error", c)
		}
	}
	if _, err := Rates(1, 0, 1, 1); err == nil {
		t.Error("Rates with zero exposure: no error")
	}
	if _, err := Rates(1, math.NaN(), 1, 1); err == nil {
		t.Error("Rates with NaN exposure: no error")
	}
}
