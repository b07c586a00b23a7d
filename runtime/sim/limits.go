package sim

import "tally/runtime/internal/runner"

// Limit adds a curve that no link can beat on a tap, such as the finite-length normal
// approximation on the frame error rate:
//
//	x.Limit("fer", "normal_approx", func(p sim.Point) float64 { return theory.NormalApprox(1024, 512, p.Get("ebn0_db")) })
//
// It is a theory curve (a table column, a dashed line in the tap's panel) and a check: a point
// whose interval on the tap lies wholly below the curve is named in the summary as a likely
// mistake in the link (the energy per bit or a code rate not counted, a decoder that sees the
// sent bits), since a simulation cannot beat a limit.
func (x *Experiment) Limit(tap, name string, fn func(p Point) float64) *Experiment {
	x.Theory(name, fn)
	x.spec.Limits = append(x.spec.Limits, runner.Limit{Tap: tap, Curve: name})
	return x
}
