package runner

import (
	"slices"

	"tally/blocks/link"
	"tally/blocks/stats"
	"tally/blocks/stop"
	"tally/runtime/result"
)

// skip asks the sweep rules about pt, given the finished points of its curve.
func (x *experiment) skip(run *result.Run, pt Point) (bool, string) {
	if len(x.SweepRules) == 0 {
		return false, ""
	}
	nx := len(x.Params[0].Values)
	first := pt.Index - pt.Index%nx // first point of pt's curve
	for _, r := range x.SweepRules {
		tap := stop.SweepTap(r)
		var done []stop.Outcome
		for _, p := range run.Points[first:pt.Index] {
			if p.Stop == "skipped" {
				continue
			}
			i := slices.IndexFunc(p.Taps, func(t result.Tap) bool { return t.Name == tap && !t.Absent })
			if i < 0 {
				continue
			}
			t := p.Taps[i]
			errs := t.Errors
			if t.Weighted() {
				errs = 0 // a budget predicts bits for counted errors only; a floor reads the interval
			}
			done = append(done, stop.Outcome{X: p.Values[0], Tally: link.Tally{Trials: t.Trials, Errors: errs},
				Estimate: stats.Estimate{Rate: t.Rate, Low: t.Low, High: t.High, Method: t.Method}})
		}
		if s, why := r.Skip(done, pt.Values[0]); s {
			if tap != link.TapBER {
				why = tap + ": " + why
			}
			return true, why
		}
	}
	return false, ""
}

// skipped is the table row of a point the sweep rules passed over: no counts, the widest
// interval, and the theory values.
func (x *experiment) skipped(run *result.Run, pt Point, why string) result.Point {
	rp := result.Point{Values: pt.Values, Stop: "skipped", Note: why}
	for _, name := range run.Taps {
		rp.Taps = append(rp.Taps, result.Tap{Name: name, High: 1, Method: x.Method})
	}
	for _, c := range x.Theory {
		rp.Theory = append(rp.Theory, c.Fn(pt))
	}
	return rp
}
