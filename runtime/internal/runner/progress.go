package runner

import (
	"context"
	"slices"

	"tally/blocks/stop"
	"tally/runtime/engine"
	"tally/runtime/progress"
	"tally/runtime/result"
)

// runEngine is engine.Run with the point's live progress line when the log is a terminal; the
// line is erased before the point's finished line is printed.
func (x *experiment) runEngine(ctx context.Context, pt Point, rules []stop.Rule, s engine.Spec) (engine.Outcome, error) {
	o := x.opts
	if !o.Quiet && isTerminal(o.log()) {
		line := progress.NewLine(o.log(), progress.Point{Label: pt.text(), Index: pt.Index, Total: x.pointCount(),
			Rules: rules, Confidence: x.Confidence, Method: x.Method})
		defer line.Close()
		s.Observers = append(slices.Clip(s.Observers), progressObserver{line: line})
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

func (x *experiment) pointCount() int {
	n := 1
	for _, p := range x.Params {
		n *= len(p.Values)
	}
	return n
}

// progressObserver draws the live line from the engine's prefix.
type progressObserver struct {
	engine.Ignore
	line *progress.Line
}

func (p progressObserver) Progress(prefix *stop.Progress) { p.line.Update(prefix) }
