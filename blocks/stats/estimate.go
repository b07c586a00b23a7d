// Package stats turns error counts into estimates and confidence intervals, weighs the
// evidence for a claim about a rate, and reads a swept BER curve at a target.
//
// Three interval methods for a count of k errors in n trials (bits or frames) are offered by
// name: "clopper-pearson" (exact, the default), "wilson" and "jeffreys". A point ended by an
// error-count stop rule is inverse binomial sampling and gets its own estimator and exact
// interval ("negative-binomial" when the rule is judged after every trial, "stagewise" when
// it is judged at frame boundaries; see InverseSampling; ForFrames picks it). With no errors
// every method gives a one-sided upper bound and a lower limit of 0; with every trial in
// error, a one-sided lower bound and an upper limit of 1. Counts up to 2⁶² are handled
// (see beta.go for how, past gonum's range).
//
// FrameEvidence is the anytime-valid test behind the stop rules that claim a rate below or
// above a target, valid however errors cluster within frames (Evidence is the same question
// for bits taken as independent). UpperLimit is the one-sided exact limit that answers "is
// the rate at most x shown?". BurstTest judges whether errors come in bursts. AtTarget reads
// the swept value where a curve reaches a BER, with an interval, and Penalty its distance
// from a theory curve.
//
// ComparePaired compares two variants of a link run on the same frames (a PairedTally): the
// difference and ratio of their rates with intervals valid under any stop rule, from the
// frame-level paired differences; CompareUnpaired is the same counts taken as independent
// runs, to show what pairing bought. FormatP prints a p-value.
package stats

import (
	"fmt"
	"math"
)

// Estimate is a rate with its confidence interval.
type Estimate struct {
	Rate   float64 // point estimate
	Low    float64 // lower confidence limit
	High   float64 // upper confidence limit
	Method string  // interval method, as recorded in run.json
}

// Contains reports whether p lies in the closed interval [Low, High].
func (e Estimate) Contains(p float64) bool { return e.Low <= p && p <= e.High }

// none is the estimate of a count with no trials: nothing is known.
func none(method string) Estimate { return Estimate{Rate: 0, Low: 0, High: 1, Method: method} }

func checkCount(k, n int64, confidence float64) error {
	switch {
	case k < 0 || n < 0:
		return fmt.Errorf("counts must not be negative (errors %d, trials %d)", k, n)
	case k > n:
		return fmt.Errorf("errors %d exceed trials %d", k, n)
	case !(confidence > 0 && confidence < 1):
		return fmt.Errorf("confidence %v must lie strictly between 0 and 1", confidence)
	}
	return nil
}

// betaInterval is the interval between Beta quantiles that Clopper–Pearson and Jeffreys
// share: after the argument checks, with α = 1 − confidence and shapes(k, n) giving the Beta
// shapes (a, b) of each limit,
//
//	low  = B⁻¹(α/2; low shapes)
//	high = B⁻¹(1−α/2; high shapes)
//
// one-sided at the ends: k = 0 gives low = 0 and high = B⁻¹(1−α; high shapes), k = n gives
// low = B⁻¹(α; low shapes) and high = 1. The rate is k/n; no trials give none(method).
func betaInterval(method string, k, n int64, confidence float64, shapes func(k, n float64) (low, high [2]float64)) (e Estimate, err error) {
	defer numeric(&e, &err)
	if err := checkCount(k, n, confidence); err != nil {
		return Estimate{}, err
	}
	if n == 0 {
		return none(method), nil
	}
	alpha := 1 - confidence
	kf, nf := float64(k), float64(n)
	lo, hi := shapes(kf, nf)
	e = Estimate{Rate: kf / nf, Method: method}
	switch {
	case k == 0:
		e.High = betaQuantile(1-alpha, hi[0], hi[1])
	case k == n:
		e.Low = betaQuantile(alpha, lo[0], lo[1])
		e.High = 1
	default:
		e.Low = betaQuantile(alpha/2, lo[0], lo[1])
		e.High = betaQuantile(1-alpha/2, hi[0], hi[1])
	}
	e.Low, e.High = clamp(e.Low), clamp(e.High)
	return e, nil
}

// numeric turns a panic of the numerical routines (gonum's panic on some extreme arguments,
// such as a confidence of 1e-300) into an error, and so does a result that is not a number.
func numeric(e *Estimate, err *error) {
	if v := recover(); v != nil {
		*e, *err = Estimate{}, fmt.Errorf("stats: cannot compute this interval (%v)", v)
		return
	}
	if *err == nil && (math.IsNaN(e.Rate) || math.IsNaN(e.Low) || math.IsNaN(e.High)) {
		*e, *err = Estimate{}, fmt.Errorf("stats: cannot compute this interval (%s: not a number)", e.Method)
	}
}

// clamp keeps a limit inside [0, 1] (quantile routines may step a hair outside).
func clamp(v float64) float64 { return math.Max(0, math.Min(1, v)) }
