package sim

import (
	"fmt"
	"strings"

	"tally/runtime/output"
	"tally/runtime/result"
)

type limit struct {
	tap, curve string
}

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
	x.limits = append(x.limits, limit{tap: tap, curve: name})
	return x
}

// checkLimits records the limits in the run and notes every point whose interval on a tap lies
// below that tap's limit curve.
func (x *Experiment) checkLimits(run *result.Run) {
	for _, l := range x.limits {
		run.Limits = append(run.Limits, result.Limit{Tap: l.tap, Curve: l.curve})
		ti := run.TapIndex(l.tap)
		ci := -1
		for i, n := range run.Theory {
			if n == l.curve {
				ci = i
			}
		}
		if ti < 0 || ci < 0 {
			run.Notes = append(run.Notes, fmt.Sprintf("The limit %s names the tap %q, which the link does not count.", l.curve, l.tap))
			continue
		}
		var below []string
		for _, p := range run.Points {
			if ti >= len(p.Taps) || ci >= len(p.Theory) {
				continue
			}
			t := p.Taps[ti]
			if t.Absent || t.Trials == 0 || p.Stop == "skipped" {
				continue
			}
			if v := p.Theory[ci]; v > 0 && t.High < v {
				var at []string
				for i, n := range run.Params {
					at = append(at, n+" "+run.Value(p, i))
				}
				below = append(below, fmt.Sprintf("%s (%s %s, interval up to %s, limit %s)",
					strings.Join(at, ", "), l.tap, output.Num(t.Rate), output.Num(t.High), output.Num(v)))
			}
		}
		if len(below) > 0 {
			run.Notes = append(run.Notes, fmt.Sprintf("**Likely error in the link:** the %s lies below the limit %s beyond its interval at %s. No link can beat that limit; check the energy per bit, the code rate and what the decoder sees.",
				l.tap, l.curve, strings.Join(below, "; ")))
		}
	}
}
