package sim

import (
	"fmt"
	"strings"

	"tally/blocks/link"
	"tally/blocks/stats"
	"tally/blocks/stop"
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

// estimateOn gives a freshly built link the experiment's estimator, unless it chose one, and
// refuses stop rules that cannot be judged under the link's estimator.
func (x *Experiment) estimateOn(l *link.Link) {
	defer x.checkRulesUnder(l)
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

// checkRulesUnder refuses, under an estimator, the stop rules it cannot judge: rules on the
// frame tap (not estimated) and the anytime-valid tests Below and Above (valid for counted
// errors only). They would never be met, so a point could run for ever.
func (x *Experiment) checkRulesUnder(l *link.Link) {
	e := l.Estimator()
	if e == link.Count {
		return
	}
	for _, r := range x.rules {
		var on, name string
		switch r := r.(type) {
		case *stop.ErrorTarget:
			on, name = r.On, "stop.Errors"
		case *stop.WidthRatio:
			on, name = r.On, "stop.Precision"
		case *stop.ShownBelow:
			panic(fmt.Errorf("sim.Stop: stop.Below is a test for counted errors and cannot be judged under %s; use stop.Precision or stop.Errors", e))
		case *stop.ShownAbove:
			panic(fmt.Errorf("sim.Stop: stop.Above is a test for counted errors and cannot be judged under %s; use stop.Precision or stop.Errors", e))
		default:
			continue
		}
		if on == link.TapFER {
			panic(fmt.Errorf("sim.Stop: %s on tap %q cannot be judged under %s: the frame tap is not estimated; judge the BER tap", name, on, e))
		}
	}
}
