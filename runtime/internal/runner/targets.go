package runner

import (
	"fmt"
	"math"
	"strings"

	"tally/blocks/stats"
	"tally/runtime/output"
	"tally/runtime/result"
)

// findTargets fills run.Targets: per target and curve, the swept value where the tap crosses
// the target rate (log BER interpolated between the bracketing points, with the interval read
// off the curves of the points' limits), and the distance from a theory curve when one is named.
func (x *experiment) findTargets(run *result.Run) {
	for _, t := range x.Targets {
		ti := run.TapIndex(t.Tap)
		if ti < 0 {
			run.Targets = append(run.Targets, result.Target{Tap: t.Tap, Rate: t.Rate, Note: "the link has no such tap"})
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
			tr := result.Target{Tap: t.Tap, Rate: t.Rate, Curve: c.label, Against: t.Against,
				Unit: output.AxisUnit(run.Params[0]), Method: stats.CrossingMethod}
			cr, err := stats.AtTarget(xs, est, t.Rate)
			if err != nil {
				tr.Note = note(err)
			} else {
				tr.Found, tr.X, tr.Low, tr.High = true, cr.X, cr.Low, cr.High
				tr.Open = openEnds(cr.Low, cr.High)
				if t.Against != "" {
					ci := -1
					for i, n := range run.Theory {
						if n == t.Against {
							ci = i
						}
					}
					if ci < 0 {
						tr.Note = fmt.Sprintf("no theory curve %q", t.Against)
					} else {
						fn := x.Theory[ci].Fn
						base := c.points[0]
						at := func(v float64) float64 {
							vals := append([]float64(nil), base.Values...)
							vals[0] = v
							return fn(Point{Names: run.Params, Values: vals, Labels: x.labels()})
						}
						loss, err := stats.Penalty(cr, at)
						if math.IsNaN(at(cr.X)) {
							// The curve has no theory (a typed curve without Theory, a NaN case
							// of the script's): nothing to compare with, and nothing claimed.
							tr.Against = ""
						} else if err != nil {
							tr.Note = note(err)
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

// openEnds says which ends of a crossing's interval the sweep leaves open, and why ("" when
// both are closed). The writers show an open end as null or an empty cell with this word.
func openEnds(low, high float64) string {
	var w []string
	if math.IsInf(low, 0) || math.IsNaN(low) {
		w = append(w, "open below: no point's lower limit reaches the target, so the crossing may lie before the first point")
	}
	if math.IsInf(high, 0) || math.IsNaN(high) {
		w = append(w, "open above: no point's upper limit falls to the target, so the crossing may lie beyond the last point")
	}
	return strings.Join(w, "; ")
}
