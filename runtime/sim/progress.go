package sim

import (
	"context"
	"strings"

	"tally/blocks/stop"
	"tally/runtime/engine"
	"tally/runtime/progress"
	"tally/runtime/result"
)

// runEngine is engine.Run with the point's live progress line when the log is a terminal; the
// line is erased before the point's finished line is printed.
func (x *Experiment) runEngine(ctx context.Context, pt Point, rules []stop.Rule, s engine.Spec) (engine.Outcome, error) {
	o := x.opts
	pp := progress.Point{Label: pt.text(), Index: pt.Index, Total: x.pointCount(),
		Rules: rules, Confidence: x.confidence, Method: x.method}
	var line *progress.Line
	if !o.Quiet && isTerminal(o.log()) {
		line = progress.NewLine(o.log(), pp)
		defer line.Close()
	}
	if line != nil || o.OnProgress != nil {
		s.OnProgress = func(pr *stop.Progress) {
			if line != nil {
				line.Update(pr)
			}
			if o.OnProgress != nil {
				o.OnProgress(pp, pr)
			}
		}
		s.ProgressEvery = progressEvery
	}
	return engine.Run(ctx, s)
}

// isTerminal and progressEvery are variables so a test can see the live line in a buffer.
var (
	isTerminal    = progress.Terminal
	progressEvery = progress.Every
)

// finishedLine is the log line of a finished point.
func finishedLine(pt Point, rp result.Point) string { return progress.Finished(pt.text(), rp) }

// text is the point's parameter values as the table shows them: "ebn0_db=4 code=1/2".
func (p Point) text() string {
	parts := make([]string, len(p.Names))
	for i, n := range p.Names {
		parts[i] = n + "=" + p.Label(n)
	}
	return strings.Join(parts, " ")
}

func (x *Experiment) pointCount() int {
	n := 1
	for _, p := range x.params {
		n *= len(p.values)
	}
	return n
}
