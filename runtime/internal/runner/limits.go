package runner

import (
	"fmt"
	"strings"

	"tally/runtime/output"
	"tally/runtime/result"
)

// checkLimits records the limits in the run and notes every point whose interval on a tap lies
// below that tap's limit curve.
func (x *experiment) checkLimits(run *result.Run) {
	for _, l := range x.Limits {
		run.Limits = append(run.Limits, result.Limit{Tap: l.Tap, Curve: l.Curve})
		ti := run.TapIndex(l.Tap)
		ci := -1
		for i, n := range run.Theory {
			if n == l.Curve {
				ci = i
			}
		}
		if ti < 0 || ci < 0 {
			run.Notes = append(run.Notes, fmt.Sprintf("The limit %s names the tap %q, which the link does not count.", l.Curve, l.Tap))
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
					strings.Join(at, ", "), l.Tap, output.Num(t.Rate), output.Num(t.High), output.Num(v)))
			}
		}
		if len(below) > 0 {
			run.Notes = append(run.Notes, fmt.Sprintf("**Likely error in the link:** the %s lies below the limit %s beyond its interval at %s. No link can beat that limit; check the energy per bit, the code rate and what the decoder sees.",
				l.Tap, l.Curve, strings.Join(below, "; ")))
		}
	}
}
