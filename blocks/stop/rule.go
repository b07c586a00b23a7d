// Package stop holds the rules that end a sweep point. A point ends when any of its rules is
// met; All(rules…) is one rule met when all of its rules are. Rules are judged by the engine on the committed prefix of frames only (frames in order,
// none missing), so where a point stops never depends on the number of workers, and a replay of
// the committed counts (resume, merge) reaches the same decision.
//
// Point rules, by the word the table's stop column shows when they end a point:
//
//	errors     Errors(n): a tap counted n errors (inverse sampling; see stats.InverseSampling)
//	bits       Bits(n): the BER tap counted n bits — a cap: it claims nothing
//	time       Time(d): wall time d (the one rule a replay cannot see) — a cap: it claims nothing
//	precision  Precision(r): High/Low ≤ r
//	below      Below(t): the rate is shown below t — the frame-level anytime test
//	           (stats.FrameEvidence) reached ln(1/(1−confidence)); a false claim has
//	           probability at most 1 − confidence, judged after every frame, with errors
//	           clustered in any way within frames
//	above      Above(t): the rate is shown above t, by the same test the other way
//	frames     Frames(n): n frames committed (a minimum inside All)
//	all(…)     All(rules…): every one of its rules met, for example "all(errors,frames)"
//
// Only below and above are claims. The interval the table gives a point is valid for the
// rule that ended it (see stats.ForFrames), whichever that was.
//
// Off the BER tap (.Tap("fer")) the word is prefixed with the tap: "fer_errors". Sweep rules
// (SweepRule: Floor, Budget) decide between points whether the next one is worth running.
package stop

import (
	"time"

	"tally/blocks/link"
	"tally/blocks/stats"
)

// Progress is what a rule sees: the counts of the committed prefix of one point.
type Progress struct {
	Frames  int64         // frames committed
	Taps    []string      // tap names, as link.Link.Taps
	Counts  []link.Tally  // per tap, same order as Taps
	Elapsed time.Duration // wall time spent on the point (only time rules look at it)
	// Pairs, on a paired comparison (sim's Variants), compare each variant after the first
	// with the reference, frame by frame (only Shown and Within look at them); nil otherwise.
	Pairs []stats.PairedTally
}

// Tap returns the counts of the named tap, and false when the link has no such tap.
func (p *Progress) Tap(name string) (link.Tally, bool) {
	for i, n := range p.Taps {
		if n == name {
			return p.Counts[i], true
		}
	}
	return link.Tally{}, false
}

// Rule decides whether a point has run enough.
type Rule interface {
	// Met reports whether the point may end now.
	Met(p *Progress) bool
	// Name is what the table's stop column says when this rule ended the point.
	Name() string
}
