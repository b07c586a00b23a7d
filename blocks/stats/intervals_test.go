package stats_test

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
	"gonum.org/v1/gonum/stat/distuv"

	"tally/blocks/stats"
)

func near(got, want, tol float64) bool { return math.Abs(got-want) <= tol }

// Published two-sided 95 % limits. Newcombe, "Two-sided confidence intervals for the single
// proportion: comparison of seven methods", Statistics in Medicine 17, 1998, Table I (values
// from memory), for the exact (Clopper–Pearson) and score (Wilson) methods; the n = 10 and
// n = 20 rows are those of the usual tables of exact binomial limits (from memory). The 0/20
// row is two-sided there, which for k = 0 is our one-sided bound at 97.5 %.
func TestPublishedLimits(t *testing.T) {
	for _, c := range []struct {
		k, n       int64
		confidence float64
		method     string
		low, high  float64
	}{
		{81, 263, 0.95, "clopper-pearson", 0.2527, 0.3676},
		{15, 148, 0.95, "clopper-pearson", 0.0578, 0.1617},
		{0, 20, 0.975, "clopper-pearson", 0, 0.1684},
		{1, 29, 0.95, "clopper-pearson", 0.0009, 0.1776},
		{81, 263, 0.95, "wilson", 0.2553, 0.3662},
		{15, 148, 0.95, "wilson", 0.0624, 0.1605},
		{0, 20, 0.975, "wilson", 0, 0.1611},
		{1, 29, 0.95, "wilson", 0.0061, 0.1718},
		{1, 10, 0.95, "clopper-pearson", 0.0025, 0.4450},
		{5, 10, 0.95, "clopper-pearson", 0.1871, 0.8129},
		{10, 20, 0.95, "clopper-pearson", 0.2720, 0.7280},
	} {
		e, err := stats.Interval(c.method, c.k, c.n, c.confidence)
		if err != nil {
			t.Fatal(err)
		}
		if !near(e.Low, c.low, 1e-4) || !near(e.High, c.high, 1e-4) {
			t.Errorf("%s %d/%d at %v: [%.4f, %.4f], want [%.4f, %.4f]", c.method, c.k, c.n, c.confidence, e.Low, e.High, c.low, c.high)
		}
		if e.Method != c.method {
			t.Errorf("Method = %q, want %q", e.Method, c.method)
		}
	}
}

// Clopper–Pearson for rare errors tends to the exact Poisson limits, χ²(α/2; 2k)/2n and
// χ²(1−α/2; 2k+2)/2n (Garwood, Biometrika 28, 1936), here from gonum's χ² quantiles. At
// n = 1e9 the two differ by about k/n; gonum's Beta quantile is good to about 1e-6 relative
// there (the k = 1 lower limit, −ln(0.975)/n in closed form, shows it), hence the tolerance.
func TestClopperPearsonPoissonLimit(t *testing.T) {
	const n = 1e9
	for _, k := range []int64{1, 3, 10, 100, 1000} {
		e, _ := stats.ClopperPearson(k, n, 0.95)
		low := distuv.ChiSquared{K: float64(2 * k)}.Quantile(0.025) / (2 * n)
		high := distuv.ChiSquared{K: float64(2*k + 2)}.Quantile(0.975) / (2 * n)
		if !near(e.Low/low, 1, 1e-5) || !near(e.High/high, 1, 1e-5) {
			t.Errorf("k=%d: [%g, %g], Poisson [%g, %g]", k, e.Low, e.High, low, high)
		}
	}
}

// Rule of three (Hanley and Lippman-Hand, "If nothing goes wrong, is everything all right?",
// JAMA 249, 1983): no errors in n trials bound the rate by about 3/n at 95 %, exactly
// −ln(0.05)/n = 2.996/n as n grows.
func TestRuleOfThree(t *testing.T) {
	for _, n := range []int64{1e3, 1e6, 1e9} {
		for _, m := range stats.Methods[:1] {
			e, _ := stats.Interval(m, 0, n, 0.95)
			if got := e.High * float64(n); !near(got, 3, 0.01) || e.Low != 0 || e.Rate != 0 {
				t.Errorf("%s 0/%d: n·High = %.4f, Low %g, want about 3 and 0", m, n, got, e.Low)
			}
		}
	}
}

// Wilson's limits are the roots of his score equation (Wilson, "Probable inference, the law
// of succession, and statistical inference", J. Am. Stat. Assoc. 22, 1927):
// (p̂ − p)² = z² p(1−p)/n.
func TestWilsonSolvesScoreEquation(t *testing.T) {
	for _, c := range [][2]int64{{1, 10}, {7, 50}, {300, 1000}, {5, 1e7}} {
		e, _ := stats.Wilson(c[0], c[1], 0.9)
		z := distuv.UnitNormal.Quantile(0.95)
		n := float64(c[1])
		for _, p := range []float64{e.Low, e.High} {
			lhs := (e.Rate - p) * (e.Rate - p)
			rhs := z * z * p * (1 - p) / n
			if !near(lhs, rhs, 1e-9*rhs) {
				t.Errorf("%d/%d: limit %g gives %g vs %g", c[0], c[1], p, lhs, rhs)
			}
		}
	}
}

// Jeffreys' limits cut α/2 off each tail of the Beta(k+½, n−k+½) posterior (Brown, Cai and
// DasGupta, "Interval estimation for a binomial proportion", Statistical Science 16, 2001,
// sec. 4.1.2). The tails are checked by quadrature of the posterior density (gonum quad).
func TestJeffreysTails(t *testing.T) {
	for _, c := range [][2]int64{{1, 29}, {15, 148}, {81, 263}} {
		k, n := float64(c[0]), float64(c[1])
		e, _ := stats.Jeffreys(c[0], c[1], 0.95)
		post := distuv.Beta{Alpha: k + 0.5, Beta: n - k + 0.5}
		lower := quad.Fixed(post.Prob, 0, e.Low, 2000, nil, 0)
		upper := quad.Fixed(post.Prob, e.High, 1, 2000, nil, 0)
		if !near(lower, 0.025, 1e-5) || !near(upper, 0.025, 1e-5) {
			t.Errorf("%v/%v: tails %g and %g, want 0.025 each", k, n, lower, upper)
		}
	}
	// Zero errors: one-sided, all of α above.
	e, _ := stats.Jeffreys(0, 100, 0.95)
	if up := 1 - (distuv.Beta{Alpha: 0.5, Beta: 100.5}).CDF(e.High); e.Low != 0 || !near(up, 0.05, 1e-9) {
		t.Errorf("0/100: Low %g, upper tail %g; want 0 and 0.05", e.Low, up)
	}
}

// Facts of the trade (common practice, no source): with 10 errors the 95 % interval spans
// about 0.5× to 2× the estimate, with 100 errors about 0.8× to 1.2×.
func TestIntervalSpanByErrors(t *testing.T) {
	for _, c := range []struct {
		k              int64
		lo, hi, within float64
	}{{10, 0.5, 2, 0.15}, {100, 0.8, 1.2, 0.04}} {
		for _, m := range stats.Methods {
			e, _ := stats.Interval(m, c.k, 1e9, 0.95)
			if l, h := e.Low/e.Rate, e.High/e.Rate; !near(l, c.lo, c.within) || !near(h, c.hi, c.within*2) {
				t.Errorf("%s, %d errors: %.2f× to %.2f×, want about %v× to %v×", m, c.k, l, h, c.lo, c.hi)
			}
		}
	}
}

// Common practice, no source: running about 10/BER bits gives an estimate within a factor
// of two of the BER with roughly 95 % confidence. Checked with gonum's binomial distribution.
func TestTenOverBER(t *testing.T) {
	const p = 1e-6
	b := distuv.Binomial{N: 10 / p, P: p}
	// Within a factor two: 5 ≤ k ≤ 20.
	within := b.CDF(20) - b.CDF(4)
	if within < 0.95 || within > 0.99 {
		t.Errorf("P(estimate within 2× of the BER) = %.4f, want roughly 0.95", within)
	}
}

func TestZeroAndAllErrors(t *testing.T) {
	for _, m := range stats.Methods {
		e, _ := stats.Interval(m, 0, 50, 0.95)
		if e.Low != 0 || e.Rate != 0 || !(e.High > 0 && e.High < 0.1) {
			t.Errorf("%s 0/50: %+v", m, e)
		}
		f, _ := stats.Interval(m, 50, 50, 0.95)
		if f.High != 1 || f.Rate != 1 || !near(f.Low, 1-e.High, 1e-12) {
			t.Errorf("%s 50/50: %+v, want the mirror of 0/50", m, f)
		}
		n, _ := stats.Interval(m, 0, 0, 0.95)
		if n.Low != 0 || n.High != 1 {
			t.Errorf("%s 0/0: %+v, want [0, 1]", m, n)
		}
	}
}

func TestMethodNamed(t *testing.T) {
	for _, name := range append([]string{"", " Wilson "}, stats.Methods...) {
		if _, err := stats.MethodNamed(name); err != nil {
			t.Errorf("%q: %v", name, err)
		}
	}
	_, err := stats.MethodNamed("wald")
	if err == nil || !strings.Contains(err.Error(), `"wald"`) || !strings.Contains(err.Error(), "clopper-pearson, wilson, jeffreys") {
		t.Errorf("unknown method: %v", err)
	}
	for _, c := range []struct {
		k, n int64
		conf float64
		want string
	}{{-1, 10, 0.95, "negative"}, {11, 10, 0.95, "exceed"}, {1, 10, 1, "confidence"}, {1, 10, math.NaN(), "confidence"}} {
		for _, m := range stats.Methods {
			if _, err := stats.Interval(m, c.k, c.n, c.conf); err == nil || !strings.Contains(err.Error(), c.want) {
				t.Errorf("%s(%d, %d, %v): %v, want %q", m, c.k, c.n, c.conf, err, c.want)
			}
		}
	}
}

func ExampleInterval() {
	for _, m := range stats.Methods {
		e, _ := stats.Interval(m, 10, 1e6, 0.95)
		fmt.Printf("%-15s %.3g [%.3g, %.3g]\n", e.Method, e.Rate, e.Low, e.High)
	}
	// Output:
	// clopper-pearson 1e-05 [4.8e-06, 1.84e-05]
	// wilson          1e-05 [5.43e-06, 1.84e-05]
	// jeffreys        1e-05 [5.14e-06, 1.77e-05]
}
