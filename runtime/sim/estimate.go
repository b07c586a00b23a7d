package sim

import (
	"fmt"
	"strings"

	"tally/blocks/link"
	"tally/runtime/internal/runner"
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
		x.spec.Estimator, x.spec.AutoEstimate = link.Count, true
		return x
	}
	e, err := link.EstimatorNamed(method)
	if err != nil {
		runner.Fail(fmt.Errorf("sim.Estimate: %w (or auto)", err))
	}
	x.spec.Estimator, x.spec.AutoEstimate = e, false
	return x
}
