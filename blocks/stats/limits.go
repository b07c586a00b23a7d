package stats

import (
	"fmt"
	"math"
)

// UpperLimit is the one-sided exact upper confidence limit of a rate from k errors in n
// trials (Clopper and Pearson, Biometrika 26, 1934, one tail): the rate u with
//
//	P(Bin(n, u) ≤ k) = 1 − confidence,  that is  u = B⁻¹(confidence; k+1, n−k),
//
// and 1 when k = n. "The rate is at most u" then holds with the given confidence: it is the
// figure that answers "is BER ≤ x shown?" (yes when u ≤ x). With no errors it is
// 1 − (1−confidence)^(1/n), about 3/n at 95 % (the rule of three). The limit is found on the
// upper tail of the Beta law, which keeps its digits when 1 − confidence is small (a quantile
// routine handed 1 − 1e-12 cannot).
func UpperLimit(k, n int64, confidence float64) (float64, error) {
	if err := checkCount(k, n, confidence); err != nil {
		return 0, err
	}
	switch {
	case n == 0 || k == n:
		return 1, nil
	}
	return tailQuantile(1-confidence, float64(k+1), float64(n-k), true)
}

// ConfidenceBelow is the confidence with which k errors in n trials show a rate at most
// rate: 1 − P(Bin(n, rate) ≤ k) = P(Beta(k+1, n−k) ≤ rate), the reverse of UpperLimit
// (UpperLimit(k, n, ConfidenceBelow(k, n, r)) = r). It is 0 when k = n.
func ConfidenceBelow(k, n int64, rate float64) (float64, error) {
	if err := checkCount(k, n, 0.5); err != nil {
		return 0, err
	}
	if !(rate >= 0 && rate <= 1) {
		return 0, fmt.Errorf("rate %v must lie between 0 and 1", rate)
	}
	if k == n {
		return 0, nil
	}
	a, b := float64(k+1), float64(n-k)
	// The smaller tail keeps its digits: near 1 the confidence is 1 − the upper tail.
	if up := betaTail(rate, a, b, true); up < 0.5 {
		return 1 - up, nil
	}
	return betaTail(rate, a, b, false), nil
}

// tailQuantile is the x where the upper (or lower) tail of Beta(a, b) equals q, found by
// bisection on log x between bounds that bracket it; accurate to a few units in the last
// place of x, as far as the tail itself is.
func tailQuantile(q, a, b float64, upper bool) (float64, error) {
	if !(q > 0 && q < 1) {
		return 0, fmt.Errorf("tail probability %v must lie strictly between 0 and 1", q)
	}
	f := func(x float64) float64 { return betaTail(x, a, b, upper) - q }
	// The upper tail falls from 1 to 0 as x grows, the lower one rises from 0 to 1.
	sign := 1.0
	if !upper {
		sign = -1
	}
	lo, hi := math.Log(math.SmallestNonzeroFloat64), 0.0
	for range 2000 {
		m := 0.5 * (lo + hi)
		if m == lo || m == hi {
			break
		}
		v := f(math.Exp(m))
		if math.IsNaN(v) {
			return 0, fmt.Errorf("the Beta(%g, %g) tail is not a number near %g", a, b, math.Exp(m))
		}
		if sign*v > 0 {
			lo = m
		} else {
			hi = m
		}
	}
	return math.Exp(0.5 * (lo + hi)), nil
}
