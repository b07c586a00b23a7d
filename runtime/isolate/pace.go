package isolate

import (
	"time"

	"tally/runtime/internal/wire"
	"tally/runtime/progress"
)

// pace guesses, from an interpreted child's reports, how long its run has left, so the parent
// can tell a run worth handing over from one that ends before the compiled script would be of
// use. A guess only decides how the run is computed, never what it counts: a wrong one costs
// time, not a byte of the table.
type pace struct {
	start     time.Time     // the child's start
	points    int           // points finished in this child
	total     int           // points in the sweep (0: not told yet)
	index     int           // the point running (its index in the sweep)
	pointFrom time.Time     // when it started (its first report)
	spent     time.Duration // the finished points' wall time in all
	left      time.Duration // the running point's time left, from its last progress
	leftOK    bool
}

func newPace(now time.Time) *pace { return &pace{start: now, pointFrom: now, index: -1} }

// live takes a progress report of the running point.
func (p *pace) live(l *wire.Live, now time.Time) {
	if l.Index != p.index {
		p.index, p.pointFrom, p.leftOK = l.Index, now, false
	}
	p.total = l.Total
	if l.Prefix.Frames > 0 {
		p.left, p.leftOK = progress.Left(l.Point().Rules, &l.Prefix)
	}
}

// point takes a finished point (the sweep's total) and starts timing the next.
func (p *pace) point(total int, now time.Time) {
	p.points++
	p.spent += now.Sub(p.pointFrom)
	p.total = total
	p.index, p.pointFrom, p.leftOK = -1, now, false
}

// remaining is the guess of the run's time left, false when there is nothing to go on yet: no
// finished point and no progress of the running one that a rule can be extrapolated from.
func (p *pace) remaining(now time.Time) (time.Duration, bool) {
	if p.total > 0 && p.points >= p.total {
		return 0, true // every point reported: the run is writing its outputs
	}
	in := now.Sub(p.pointFrom) // in the running point so far
	var per time.Duration      // a point's time, from those finished
	if p.points > 0 {
		per = p.spent / time.Duration(p.points)
	}
	var cur time.Duration // the running point's time left
	switch {
	case p.leftOK:
		cur = p.left
	case p.points > 0:
		// No rule to extrapolate yet (an error count before its first error): what the mean
		// point's time leaves, or, past the mean, as long again as it has run, since such a
		// point is often the slow last one of a sweep.
		cur = per - in
		if in >= per {
			cur = in
		}
	default:
		return 0, false
	}
	if per == 0 {
		per = in + cur
	}
	after := 0 // points after the running one
	if p.total > 0 {
		after = max(p.total-p.points-1, 0)
	}
	return cur + time.Duration(after)*per, true
}

// The thresholds of the parent's two decisions (see parent.stage).
const (
	// yieldBeyond: a run with more than this left yields the processors to the build.
	yieldBeyond = 300 * time.Millisecond
	// yieldBlind: a run that gives nothing to go on for this long (its first frames slow, a
	// check of its own blocks) yields: a slow frame is what the compiled script is for.
	yieldBlind = 150 * time.Millisecond
	// handBeyond: a run with more than this left is handed over once the build is ready
	// (starting the compiled script and reading the checkpoint cost tens of milliseconds, and
	// the compiled script then computes many times faster).
	handBeyond = 150 * time.Millisecond
)

// shouldYield says whether an interpreted run should now yield to the build beside it.
func (p *pace) shouldYield(now time.Time) bool {
	if left, ok := p.remaining(now); ok {
		return left > yieldBeyond
	}
	return now.Sub(p.start) >= yieldBlind
}

// shouldHand says whether, the build ready, the run should be handed over now.
func (p *pace) shouldHand(now time.Time) bool {
	left, ok := p.remaining(now)
	return !ok || left > handBeyond
}
