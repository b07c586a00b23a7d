package stats

import (
	"math"
	"testing"
)

// binomialCDF is the reference P(Bin(n, p) ≤ k) for the tests, summed term by term:
// ln C(n, j) = Σ_{i<j} ln((n−i)/(j−i)) built up one term at a time, and (n−j)·ln(1−p) by
// log1p, so no large ln Γ cancels (common practice, no source). Each term carries about 1e-13
// of relative error at n = 1e15, far inside the 1e-6 the tests ask.
func binomialCDF(k, n int64, p float64) float64 {
	nf := float64(n)
	l1p, lp := math.Log1p(-p), math.Log(p)
	lc := 0.0 // ln C(n, j)
	sum := 0.0
	for j := int64(0); j <= k; j++ {
		if j > 0 {
			lc += math.Log((nf - float64(j-1)) / float64(j))
		}
		lt := lc + float64(n-j)*l1p
		if j > 0 {
			lt += float64(j) * lp
		}
		sum += math.Exp(lt)
	}
	return sum
}

// refUpper solves binomialCDF(k, n, u) = 1 − confidence by bisection on ln u within a factor
// of 4 of guess.
func refUpper(k, n int64, confidence, guess float64) float64 {
	lo, hi := math.Log(guess/4), math.Min(0, math.Log(guess*4))
	for range 60 {
		m := 0.5 * (lo + hi)
		if binomialCDF(k, n, math.Exp(m)) > 1-confidence {
			lo = m
		} else {
			hi = m
		}
	}
	return math.Exp(0.5 * (lo + hi))
}

// UpperLimit against an independent reference, the binomial tail summed term by term and
// solved by bisection (the definition of the one-sided Clopper–Pearson limit, Clopper and
// Pearson, Biometrika 26, 1934), to 1e-6 relative at confidences from 0.5 to 1 − 1e-9, and
// ConfidenceBelow as its reverse.
func TestUpperLimitAgainstBinomialSum(t *testing.T) {
	for _, n := range []int64{1000, 1e6, 5e6, 1e9, 1e12, 1e15} {
		for _, k := range []int64{0, 1, 10, 100, 1000, 10000, 100000} {
			if k >= n/10 || (k >= 10000 && n > 5e6) {
				continue
			}
			for _, c := range []float64{0.5, 0.9, 0.95, 0.99, 0.999, 1 - 1e-6, 1 - 1e-9} {
				got, err := UpperLimit(k, n, c)
				if err != nil {
					t.Fatal(err)
				}
				want := refUpper(k, n, c, got)
				if math.Abs(got/want-1) > 1e-6 {
					t.Errorf("k=%d n=%d conf %v: upper %.12g, reference %.12g (%.2g relative)", k, n, c, got, want, got/want-1)
				}
				back, _ := ConfidenceBelow(k, n, want)
				if math.Abs(back-c) > 1e-5*(1-c)+1e-10 {
					t.Errorf("k=%d n=%d conf %v: ConfidenceBelow at the reference limit %.12g", k, n, c, back)
				}
			}
		}
	}
}

// With no errors the limit is 1 − (1−confidence)^(1/n) in closed form (Clopper–Pearson with
// k = 0; the rule of three is its first term, Hanley and Lippman-Hand, JAMA 249, 1983), also
// where a Beta quantile routine asked for q = 1 − 1e-16 loses it.
func TestUpperLimitNoErrorsClosedForm(t *testing.T) {
	for _, n := range []int64{1, 590, 1e6, 1e12} {
		for _, c := range []float64{0.95, 0.9999999, 0.9999999999999999} {
			got, _ := UpperLimit(0, n, c)
			want := -math.Expm1(math.Log(1-c) / float64(n))
			if math.Abs(got/want-1) > 1e-9 {
				t.Errorf("n=%d conf %v: %.15g, want %.15g", n, c, got, want)
			}
		}
	}
}

// The two-sided interval keeps its upper end near confidence 1 too: with no errors it is
// one-sided, 1 − (1−C)^(1/n) (Clopper and Pearson, Biometrika 26, 1934); for 590 trials at
// C = 1 − 1e-15 that is 0.0568, where a Beta quantile routine asked for q = C returns 1.
func TestClopperPearsonNearConfidenceOne(t *testing.T) {
	for _, c := range []float64{1 - 1e-7, 1 - 1e-12, 1 - 1e-15} {
		e, err := ClopperPearson(0, 590, c)
		want := -math.Expm1(math.Log(1-c) / 590)
		if err != nil || math.Abs(e.High/want-1) > 1e-9 {
			t.Errorf("conf %v: high %v (%v), want %v", c, e.High, err, want)
		}
	}
}
