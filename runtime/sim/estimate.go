package sim

import (
	"fmt"
	"strings"

	"tally/blocks/link"
	"tally/blocks/stats"
	"tally/runtime/result"
)

// Estimate sets how every point's link estimates its BER: "count" (plain Monte Carlo, the
// default), "importance" (importance sampling) or "semi-analytic"; see link.Estimator. A link
// refused by the estimator stops the script with the block that breaks its assumptions named.
// "auto" picks per link: semi-analytic where its assumptions hold (it is exact), else
// importance sampling, else counting. A link that chose its own estimator
// (link.Link.Estimate) keeps it, so a script can also switch per point:
//
//	x.Estimate("importance")
//	x.Stop(stop.Errors(100), stop.Bits(1e8))   // Errors: the precision of 100 counted errors
func (x *Experiment) Estimate(method string) *Experiment {
	if strings.EqualFold(strings.TrimSpace(method), "auto") {
		x.estimator, x.autoEstimate = link.Count, true
		return x
	}
	e, err := link.EstimatorNamed(method)
	if err != nil {
		fail(fmt.Errorf("sim.Estimate: %w (or auto)", err))
	}
	x.estimator, x.autoEstimate = e, false
	return x
}

// estimateOn gives a freshly built link the experiment's estimator, unless it chose one.
func (x *Experiment) estimateOn(l *link.Link) {
	if l.Estimator() != link.Count {
		return
	}
	if x.autoEstimate {
		for _, e := range []link.Estimator{link.SemiAnalytic, link.Importance} {
			if l.CheckEstimator(e) == nil {
				l.Estimate(e.String())
				return
			}
		}
		return
	}
	if x.estimator != link.Count {
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
