package stop

import (
	"fmt"
	"strings"

	"tally/blocks/link"
)

// FrameCount is met once a point has committed Min frames. Alone it ends every point after
// Min frames; inside All it is a minimum, so that one burst of errors in the first frames
// cannot end a point.
type FrameCount struct{ Min int64 }

// Frames is met once n frames are committed: stop.All(stop.Errors(100), stop.Frames(20)) ends
// a point at 100 errors but not before 20 frames.
func Frames(n int64) *FrameCount { return &FrameCount{Min: n} }

// Met is true once Min frames are committed.
func (r *FrameCount) Met(p *Progress) bool { return p.Frames >= r.Min }

// Name is "frames".
func (r *FrameCount) Name() string { return "frames" }

// Err reports a count below one frame.
func (r *FrameCount) Err() error {
	if r.Min < 1 {
		return fmt.Errorf("stop.Frames: count %d must be at least 1", r.Min)
	}
	return nil
}

// AllOf is met once every one of its rules is met on the same committed prefix: a point
// ended by it has, for example, both 100 errors and 20 frames. It is judged like any rule, on
// the committed prefix in frame order (a shard: on its estimate of the prefix), so resume,
// replay and merge reach the same end.
//
// The interval of a point it ended. A point ended by Errors(r) alone gets the inverse
// sampling interval (stats.InverseSampling), valid because the count stopped at the first
// frame with r errors. Under All(Errors(r), Frames(F)) that holds only when the error rule
// was the last one met: if the point ended after frame F, the frame before it had fewer than r
// errors and the outcome is exactly that of inverse sampling (the stage-wise orderings agree
// outcome for outcome). If it ended at frame F, with r or more errors already counted, the
// frame count was fixed in advance and the fixed-sample interval is the right one (with
// Clopper–Pearson, the stage-wise ordering's own limits at a fixed frame). Target tells which.
type AllOf struct{ Rules []Rule }

// All is met once all of rules are met. Its name in the table's stop column lists theirs:
// "all(errors,frames)".
func All(rules ...Rule) *AllOf { return &AllOf{Rules: rules} }

// Met is true once every rule is met (and false with no rules).
func (a *AllOf) Met(p *Progress) bool {
	if len(a.Rules) == 0 {
		return false
	}
	for _, r := range a.Rules {
		if r == nil || !r.Met(p) {
			return false
		}
	}
	return true
}

// Name is "all(" and its rules' names, comma-separated, and ")".
func (a *AllOf) Name() string {
	names := make([]string, len(a.Rules))
	for i, r := range a.Rules {
		if r != nil {
			names[i] = r.Name()
		}
	}
	return "all(" + strings.Join(names, ",") + ")"
}

// Err reports an All with no rules, a nil rule, and the first error of its rules.
func (a *AllOf) Err() error {
	if len(a.Rules) == 0 {
		return fmt.Errorf("stop.All: no rules given")
	}
	for i, r := range a.Rules {
		if r == nil {
			return fmt.Errorf("stop.All: rule %d is nil", i+1)
		}
		if c, ok := r.(link.Checked); ok {
			if err := c.Err(); err != nil {
				return fmt.Errorf("stop.All: %w", err)
			}
		}
	}
	return nil
}

// Target is the error count rule that ended a point All ended with the counts p, or nil when
// the stop was not that rule's own. It is that rule when All holds exactly one ErrorTarget,
// its other rules count frames or bits only (Frames, Bits: what they saw one frame earlier is
// known from p) and they were all met already one frame before the end, so the error count
// was the last rule met. Otherwise nil: the count was not stopped by an error target alone
// and the fixed-sample interval is used.
func (a *AllOf) Target(p *Progress) *ErrorTarget {
	var target *ErrorTarget
	if p.Frames < 1 {
		return nil
	}
	// The prefix one frame before the end, as far as Frames and Bits look at it: frames have a
	// fixed size, so the BER tap's trials scale exactly (a tap whose trials do not split into
	// equal frames is left at 0, and Bits is then not known to have been met).
	before := &Progress{Frames: p.Frames - 1, Taps: p.Taps, Counts: make([]link.Tally, len(p.Counts))}
	for i, c := range p.Counts {
		if c.Trials%p.Frames == 0 {
			before.Counts[i].Trials = c.Trials - c.Trials/p.Frames
		}
	}
	for _, r := range a.Rules {
		switch r := r.(type) {
		case *ErrorTarget:
			if target != nil {
				return nil
			}
			target = r
		case *FrameCount, *BitCap:
			if !r.Met(before) {
				return nil
			}
		default:
			return nil
		}
	}
	return target
}

// EndedBy is the error count rule that ended a point, given the rule met and the point's
// final counts: the rule itself when it is an ErrorTarget, All's Target when it is an All,
// and nil otherwise. The engine's caller takes the inverse sampling interval on its tap when
// it is not nil.
func EndedBy(met Rule, p *Progress) *ErrorTarget {
	switch r := met.(type) {
	case *ErrorTarget:
		return r
	case *AllOf:
		return r.Target(p)
	}
	return nil
}
