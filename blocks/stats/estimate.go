// Package stats turns error counts into estimates and confidence intervals, weighs the
// evidence for a claim about a rate, and reads a swept BER curve at a target.
//
// Three interval methods for a count of k errors in n trials (bits or frames) are offered by
// name: "clopper-pearson" (exact, the default), "wilson" and "jeffreys". A point ended by an
// error-count stop rule is inverse binomial sampling and gets its own estimator and exact
// interval ("negative-binomial", see InverseSampling; ForFrames picks it). With no errors
// every method gives a one-sided upper bound and a lower limit of 0; with every trial in
// error, a one-sided lower bound and an upper limit of 1. Counts up to 2⁶² are handled
// (see beta.go for how, past gonum's range).
//
// Evidence is the anytime-valid test behind the stop rules that claim a rate below or above
// a target. AtTarget reads the swept value where a curve reaches a BER, with an interval,
// and Penalty its distance from a theory curve.
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
