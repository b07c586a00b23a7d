package stats

import (
	"fmt"
	"math"
)

// InverseMethod is the Method of an estimate made by InverseSampling.
const InverseMethod = "negative-binomial"

// InverseSampling is the estimate for a count ended by an error-count rule: trials are run
// in frames of equal size until the first frame boundary with at least r errors; k errors
// were then counted in n trials, in frames frames (frame size L = n/frames; L = 1 is the
// rule judged after every trial).
//
// Stopping at a fixed number of errors is inverse binomial sampling (Haldane, "On a method
// of estimating frequencies", Biometrika 33, 1945): the trials are random and the errors
// (nearly) fixed, so the fixed-n estimate k/n is biased upward, by about 1/(r−1) of the rate
// (11 % at 10 errors), and the fixed-n limits are not the right ones.
//
// The interval inverts the two tails of the number of frames F, as Clopper and Pearson
// (Biometrika 26, 1934) do for the binomial, through the identity between a negative-binomial
// and a binomial tail, P(F ≤ f) = P(Bin(fL, p) ≥ r) (for L = 1 see e.g. Johnson, Kemp and
// Kotz, Univariate Discrete Distributions, 3rd ed., 2005, ch. 5), which makes each limit a
// Beta quantile B⁻¹(q; a, b):
//
//	low  = B⁻¹(α/2; r, n−r+1)        P(F ≤ f | low)  = α/2
//	high = B⁻¹(1−α/2; r, n−L−r+1)    P(F ≥ f | high) = α/2   (high = 1 when n−L < r)
//
// With L = 1 these are the exact negative-binomial limits B⁻¹(α/2; r, n−r+1) and
// B⁻¹(1−α/2; r, n−r): the lower one is Clopper–Pearson's, the upper one tighter. The
// estimate is the unbiased one given (F, k): the expected share of errors among the n−L
// trials before the last frame, E[j]/(n−L), over the j ≤ r−1 errors those trials may hold
// (all arrangements of the k errors are equally likely given the counts). For L = 1 it is
// Haldane's (r−1)/(n−1); with a single frame it is k/n.
func InverseSampling(k, n, frames, r int64, confidence float64) (e Estimate, err error) {
	defer numeric(&e, &err)
	if err := checkCount(k, n, confidence); err != nil {
		return Estimate{}, err
	}
	switch {
	case r < 1:
		return Estimate{}, fmt.Errorf("error target %d must be at least 1", r)
	case k < r:
		return Estimate{}, fmt.Errorf("errors %d fall short of the target %d the count stopped at", k, r)
	case frames < 1 || frames > n || n%frames != 0:
		return Estimate{}, fmt.Errorf("%d trials do not split into %d equal frames", n, frames)
	}
	L := n / frames
	m := n - L // trials before the last frame
	// j errors before the last frame: j ≤ r−1 (else the count would have stopped earlier),
	// j ≤ m, and k−j ≤ L.
	jlo, jhi := max(0, k-L), min(r-1, m)
	if jlo > jhi {
		return Estimate{}, fmt.Errorf("%d errors in %d trials (%d frames) cannot have stopped at the first frame with %d errors", k, n, frames, r)
	}
	alpha := 1 - confidence
	rf, nf, mf := float64(r), float64(n), float64(m)
	e = Estimate{High: 1, Method: InverseMethod}
	e.Low = clamp(betaQuantile(alpha/2, rf, nf-rf+1))
	if m >= r {
		e.High = clamp(betaQuantile(1-alpha/2, rf, mf-rf+1))
	}
	if m == 0 {
		e.Rate = float64(k) / nf
		return e, nil
	}
	// E[j] under the weights w(j) = C(m, j)·C(L, k−j), in logs from w(jlo) by the ratio
	// w(j+1)/w(j) = (m−j)/(j+1) · (k−j)/(L−k+j+1), and summed against the largest term.
	step := func(j int64) float64 {
		return math.Log(float64(m-j)/float64(j+1)) + math.Log(float64(k-j)/float64(L-k+j+1))
	}
	top, lw := 0.0, 0.0
	for j := jlo; j < jhi; j++ {
		lw += step(j)
		top = math.Max(top, lw)
	}
	var sw, sj float64
	lw = 0
	for j := jlo; j <= jhi; j++ {
		w := math.Exp(lw - top)
		sw += w
		sj += float64(j) * w
		if j < jhi {
			lw += step(j)
		}
	}
	e.Rate = sj / sw / mf
	return e, nil
}
