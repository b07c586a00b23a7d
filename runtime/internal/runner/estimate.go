package runner

import (
	"fmt"

	"tally/blocks/link"
	"tally/blocks/stats"
	"tally/blocks/stop"
	"tally/runtime/result"
)

// estimateOn gives a freshly built link the experiment's estimator, unless it chose one, and
// refuses stop rules that cannot be judged under the link's estimator.
func (x *experiment) estimateOn(l *link.Link) {
	defer x.checkRulesUnder(l)
	if l.Estimator() != link.Count {
		return
	}
	if x.AutoEstimate {
		for _, e := range []link.Estimator{link.SemiAnalytic, link.Importance} {
			if l.CheckEstimator(e) == nil {
				l.Estimate(e.String())
				return
			}
		}
		return
	}
	if x.Estimator != link.Count {
		l.Estimate(x.Estimator.String())
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
func (x *experiment) checkRulesUnder(l *link.Link) {
	e := l.Estimator()
	if e == link.Count {
		return
	}
	for _, r := range x.Rules {
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
