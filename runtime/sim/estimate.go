package sim

import (
	"fmt"

	"tally/blocks/link"
	"tally/blocks/stats"
	"tally/runtime/result"
)

// Estimate sets how every point's link estimates its BER: "count" (plain Monte Carlo, the
// default), "importance" (importance sampling) or "semi-analytic"; see link.Estimator. A link
// refused by the estimator stops the script with the block that breaks its assumptions named.
// A link that chose its own estimator (link.Link.Estimate) keeps it, so a script can switch
// per point:
//
//	x.Estimate("importance")
//	x.Stop(stop.Precision(1.2), stop.Bits(1e8))
func (x *Experiment) Estimate(method string) *Experiment {
	e, err := link.EstimatorNamed(method)
	if err != nil {
		fail(fmt.Errorf("sim.Estimate: %w", err))
	}
	x.estimator = e
	return x
}

// estimateOn gives a freshly built link the experiment's estimator, unless it chose one.
func (x *Experiment) estimateOn(l *link.Link) {
	if x.estimator != link.Count && l.Estimator() == link.Count {
		l.Estimate(x.estimator.String())
	}
}

// weightedTap is the reported tap of a tally summed with weights.
func weightedTap(name string, c link.Tally, confidence float64) (result.Tap, error) {
	if c.Estimator == link.Unestimated {
		return result.Tap{Name: name, Absent: true, Estimator: c.Estimator.String()}, nil
	}
	w, err := stats.Weighted(c, confidence)
	if err != nil {
		return result.Tap{}, fmt.Errorf("tap %s: %w", name, err)
	}
	return result.Tap{Name: name, Trials: c.Trials, Errors: c.Errors, Rate: w.Rate, Low: w.Low, High: w.High,
		Method: w.Method, Estimator: c.Estimator.String(), IntervalFrom: "variance of the weighted sums between frames",
		Effective: w.Effective, Degenerate: w.Degenerate, PlainBits: stats.PlainBits(c)}, nil
}
