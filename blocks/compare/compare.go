// Package compare tells whether two error counts differ by more than chance: the BER of a
// point before and after a change to a link, or of two receivers measured apart.
//
// Both tests are exact and conditional: given the total number of errors K = k1 + k2 seen in
// the two measurements, the share k1 that fell to the first one has a known distribution when
// the two error rates are equal, free of the unknown common rate. The two-sided p-value is the
// probability, under that distribution, of a split at most as likely as the one observed (the
// usual minimum-likelihood convention for Fisher's test).
//
// Both assume independent trials. Bit errors behind a decoder, an equaliser or a burst channel
// come in clusters, so the BER tap's counts are over-dispersed and these p-values then come out
// too small; the frame tap's counts (one trial per frame) meet the assumption. Two runs of one
// script with the same seed share their random streams, so their counts are positively
// correlated; a test that assumes independence is then conservative.
package compare

import (
	"fmt"
	"math"
)

// Result is the outcome of a two-sample test on error counts.
type Result struct {
	P      float64 // two-sided p-value
	Ratio  float64 // rate of the second sample over the first (k2/n2)/(k1/n1); NaN when undefined
	Method string
}

// Significant reports whether the p-value lies below the level alpha (0.05, say).
func (r Result) Significant(alpha float64) bool { return r.P < alpha }

// Proportions is Fisher's exact test of two binomial proportions, k1 errors in n1 trials
// against k2 in n2 (Fisher, Statistical Methods for Research Workers, 1925 onwards; Irwin,
// Metron 12, 1935). Given K = k1 + k2 errors among N = n1 + n2 trials, k1 is hypergeometric
// when the two error probabilities are equal:
//
//	P(k1 = x) = C(K, x) · C(N−K, n1−x) / C(N, n1),  max(0, K−n2) ≤ x ≤ min(K, n1).
//
// The work grows with K, not with the trials, so it suits counts of 10⁹ bits.
func Proportions(k1, n1, k2, n2 int64) (Result, error) {
	if err := check(k1, n1, k2, n2); err != nil {
		return Result{}, fmt.Errorf("compare.Proportions: %w", err)
	}
	k := k1 + k2
	lo, hi := max(0, k-n2), min(k, n1)
	// pmf(x+1)/pmf(x) = (K−x)(n1−x) / ((x+1)(n2−K+x+1))
	ratio := func(x int64) float64 {
		return math.Log(float64(k-x)) + math.Log(float64(n1-x)) - math.Log(float64(x+1)) - math.Log(float64(n2-k+x+1))
	}
	return Result{P: twoSided(lo, hi, k1, ratio), Ratio: rateRatio(k1, n1, k2, n2), Method: "fisher-exact"}, nil
}

// Rates is the conditional test of two Poisson rates, k1 events in exposure t1 against k2 in
// t2 (Przyborowski and Wilenski, Biometrika 31, 1940): given K = k1 + k2, k1 is binomial
// (K, t1/(t1+t2)) when the rates are equal. With exposures in bits it is the limit of
// Proportions for error rates far below one, and needs no bound on the counts.
func Rates(k1 int64, t1 float64, k2 int64, t2 float64) (Result, error) {
	switch {
	case k1 < 0 || k2 < 0:
		return Result{}, fmt.Errorf("compare.Rates: counts %d and %d must not be negative", k1, k2)
	case !(t1 > 0) || !(t2 > 0) || math.IsInf(t1, 0) || math.IsInf(t2, 0):
		return Result{}, fmt.Errorf("compare.Rates: exposures %v and %v must be positive and finite", t1, t2)
	}
	k := k1 + k2
	p := t1 / (t1 + t2)
	lp := math.Log(p) - math.Log1p(-p)
	// pmf(x+1)/pmf(x) = (K−x)/(x+1) · p/(1−p)
	ratio := func(x int64) float64 { return math.Log(float64(k-x)) - math.Log(float64(x+1)) + lp }
	r := math.NaN()
	if k1 > 0 {
		r = (float64(k2) / t2) / (float64(k1) / t1)
	}
	return Result{P: twoSided(0, k, k1, ratio), Ratio: r, Method: "poisson-conditional"}, nil
}

func check(k1, n1, k2, n2 int64) error {
	switch {
	case k1 < 0 || k2 < 0 || n1 < 0 || n2 < 0:
		return fmt.Errorf("counts must not be negative (%d/%d, %d/%d)", k1, n1, k2, n2)
	case k1 > n1 || k2 > n2:
		return fmt.Errorf("errors exceed trials (%d/%d, %d/%d)", k1, n1, k2, n2)
	case n1 == 0 || n2 == 0:
		return fmt.Errorf("a sample has no trials (%d/%d, %d/%d)", k1, n1, k2, n2)
	}
	return nil
}

func rateRatio(k1, n1, k2, n2 int64) float64 {
	if k1 == 0 {
		return math.NaN()
	}
	return (float64(k2) / float64(n2)) / (float64(k1) / float64(n1))
}

// twoSided sums the probabilities of the support lo..hi that are no larger than that of obs,
// for a distribution given by the log ratios of consecutive probabilities. The log
// probabilities are built up from lo by those ratios and normalised at the end, which stays
// accurate where factorials of 10⁹ would not.
func twoSided(lo, hi, obs int64, logRatio func(x int64) float64) float64 {
	if lo == hi {
		return 1
	}
	// First pass: the largest log probability and the observed one (unnormalised).
	var l, top, at float64
	top = math.Inf(-1)
	for x := lo; ; x++ {
		top = math.Max(top, l)
		if x == obs {
			at = l
		}
		if x == hi {
			break
		}
		l += logRatio(x)
	}
	// Second pass: the total and the part no more likely than obs. The relative tolerance of
	// 1e-7 keeps splits of equal probability (symmetric cases) from falling out by rounding.
	limit := at + 1e-7
	var total, tail float64
	l = 0
	for x := lo; ; x++ {
		w := math.Exp(l - top)
		total += w
		if l <= limit {
			tail += w
		}
		if x == hi {
			break
		}
		l += logRatio(x)
	}
	return math.Min(1, tail/total)
}
