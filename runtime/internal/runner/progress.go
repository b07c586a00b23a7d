package runner

import (
	"context"
	"fmt"
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
	pp := progress.Point{Label: pt.text(), Index: pt.Index, Total: x.pointCount(),
		Rules: rules, Confidence: x.Confidence, Method: x.Method, Tap: x.tap, Custom: x.custom}
	var line *progress.Line
	if !o.Quiet && isTerminal(o.log()) {
		line = progress.NewLine(o.log(), pp)
		defer line.Close()
	}
	if line != nil || o.OnProgress != nil {
		s.Observers = append(slices.Clip(s.Observers), progressObserver{line: line, pt: pp, on: o.OnProgress})
		s.ProgressEvery = progressEvery
	}
	return engine.Run(ctx, s)
}

// isTerminal and progressEvery are variables so a test can see the live line in a buffer.
var (
	isTerminal    = progress.Terminal
	progressEvery = progress.Every
)

// finishedLine is the log line of a finished point, on the governing tap, saying when its
// frames were replayed from the last run.
func (x *experiment) finishedLine(pt Point, rp result.Point) string {
	s := progress.FinishedOn(pt.text(), rp, x.tap)
	switch n := rp.FramesReused; {
	case n > 0 && n == rp.Frames:
		s += "  (reused: the last run's frames replayed)"
	case n > 0:
		s += fmt.Sprintf("  (%d of %d frames replayed from the last run)", n, rp.Frames)
	}
	return s
}

func (x *experiment) pointCount() int {
	n := 1
	for _, p := range x.Params {
		n *= len(p.Values)
	}
	return n
}

// progressObserver draws the live line from the engine's prefix (line nil: none shown) and
// hands the prefix to Options.OnProgress.
type progressObserver struct {
	engine.Ignore
	line *progress.Line
	pt   progress.Point
	on   func(progress.Point, *stop.Progress)
}

func (p progressObserver) Progress(prefix *stop.Progress) {
	if p.line != nil {
		p.line.Update(prefix)
	}
	if p.on != nil {
		p.on(p.pt, prefix)
	}
}
