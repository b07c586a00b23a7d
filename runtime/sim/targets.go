package sim

import (
	"fmt"

	"tally/blocks/stats"
	"tally/runtime/output"
	"tally/runtime/result"
)

// findTargets fills run.Targets: per target and curve, the swept value where the tap crosses
// the target rate (log BER interpolated between the bracketing points, with the interval read
// off the curves of the points' limits), and the distance from a theory curve when one is named.
func (x *Experiment) findTargets(run *result.Run) {
	for _, t := range x.targets {
		ti := run.TapIndex(t.tap)
		if ti < 0 {
			run.Targets = append(run.Targets, result.Target{Tap: t.tap, Rate: t.rate, Note: "the link has no such tap"})
			continue
		}
		var first *result.Target // the first curve's crossing: the others are compared with it
		for _, c := range x.curves(run) {
			var xs []float64
			var est []stats.Estimate
			for _, p := range c.points {
				if p.Stop == "skipped" {
					continue
				}
				tp := p.Taps[ti]
				xs = append(xs, p.Values[0])
				est = append(est, stats.Estimate{Rate: tp.Rate, Low: tp.Low, High: tp.High})
			}
			tr := result.Target{Tap: t.tap, Rate: t.rate, Curve: c.label, Against: t.against,
				Unit: output.AxisUnit(run.Params[0]), Method: stats.CrossingMethod}
			cr, err := stats.AtTarget(xs, est, t.rate)
			if err != nil {
				tr.Note = err.Error()
			} else {
				tr.Found, tr.X, tr.Low, tr.High = true, cr.X, cr.Low, cr.High
				if t.against != "" {
					ci := -1
					for i, n := range run.Theory {
						if n == t.against {
							ci = i
						}
					}
					if ci < 0 {
						tr.Note = fmt.Sprintf("no theory curve %q", t.against)
					} else {
						fn := x.theory[ci].fn
						base := c.points[0]
						loss, err := stats.Penalty(cr, func(v float64) float64 {
							vals := append([]float64(nil), base.Values...)
							vals[0] = v
							return fn(Point{Names: run.Params, Values: vals, labels: x.labels()})
						})
						if err != nil {
							tr.Note = err.Error()
						} else {
							tr.Penalty, tr.TheoryX = loss.DB, loss.Theory
						}
					}
				}
			}
			if first == nil {
				first = &tr
			} else if first.Found && tr.Found {
				tr.Gain, tr.GainOver = first.X-tr.X, first.Curve
			}
			run.Targets = append(run.Targets, tr)
		}
	}
}
