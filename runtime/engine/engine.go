// Package engine runs the points of a sweep: frames on parallel workers, committed in frame
// order, with the stop rules judged on the committed prefix only.
//
// Frame f of point p draws its randomness from streams keyed by (seed, p, f, block), so a
// frame's counts do not depend on the worker that computed it; committing in order and judging
// rules on the prefix makes the bits, errors and stop reason of every point the same for any
// number of workers. The per-point sequence of committed frame counts is the source of truth:
// a checkpoint or a shard merge replays it.
package engine

import (
	"context"
	"fmt"
	"math"
	"runtime"
	"time"

	"gonum.org/v1/gonum/stat/distuv"

	"tally/blocks/link"
	"tally/blocks/stats"
	"tally/blocks/stop"
	"tally/runtime/framelog"
)

// Spec is one point's work.
type Spec struct {
	Point   int                        // point index (keys the streams), from 0 like sim.Point.Index
	Label   string                     // the point's values for messages ("ebn0_db=4"), if any
	Build   func() (*link.Link, error) // makes the link; called once per worker
	Rules   []stop.Rule                // the point ends when any is met
	Seed    uint64
	Workers int // 0 means all cores

	// Start is the committed state to continue from (resume): frames 0..Start.Frames-1 are
	// taken as done with these counts. Nil starts afresh. The rules are judged on it before
	// any frame is computed, so a point that had ended ends again, for the same rule.
	Start *State
	// Shard, when set, selects the frames this run computes: frame f is computed when
	// f % Of == Index, and Start, Outcome and the observers count this shard's frames only. Its
	// counts are not a prefix of the point, so the rules cannot be judged on them; see Shard
	// for when a shard ends.
	Shard *Shard
	// Replay, when set, replaces computing: frame f's counts are Replay(f), taken in frame
	// order from Start on and judged exactly as computed frames are (a merge of shards). When
	// Replay has no frame f the point ends with Stop == Short. Build is called once, for the
	// taps.
	Replay func(frame int64) ([]link.Tally, bool)
	// Observers are told of the point's progress: its taps, each commit in frame order, the
	// prefix at most every ProgressEvery, and its outcome (see Observer).
	Observers     []Observer
	ProgressEvery time.Duration
	// Where, if set, is called when a block panics, from the panicking goroutine, to name the
	// script position reached (the host's marker, or the compiled stack).
	Where func() string
}

// name is how messages name the point: "point 2 (ebn0_db=4)". Points and frames are numbered
// from 0, as a script sees them (sim.Point.Index, link.Frame.Index).
func (s Spec) name() string {
	if s.Label == "" {
		return fmt.Sprintf("point %d", s.Point)
	}
	return fmt.Sprintf("point %d (%s)", s.Point, s.Label)
}

// Shard is a deterministic share of a point's frames: frame f belongs to shard f mod Of.
//
// A shard cannot judge the rules, which hold for the whole point's prefix, so it judges them
// on an estimate of what all Of shards together have counted when it has counted its own
// share (see Estimate), and ends once a rule is met on that estimate and it has computed at
// least Min of its own frames. The merge then judges the real prefix; should the estimate
// have erred, the merge names the points that need more frames and a further round extends
// them (Min).
//
// Shards that share a folder tell each other their counts as they go (Seen): the estimate
// then counts what the others have told exactly and estimates only the rest, so the shards
// stop near where one machine would. Seen may be replaced between commits (by an Observer,
// which runs on the committing goroutine).
type Shard struct {
	Index, Of int     // this shard computes frames f with f % Of == Index
	Min       int64   // frames of this shard to compute at least
	Z         float64 // margin of the estimate in standard deviations (0: Margin(Of))
	Seen      []Seen  // what the other shards have told of the point, one per shard (none: Estimate alone)
}

// Miss is the chance the shard estimates aim at of a point falling short in the merge: a point
// is covered in one round when every one of its Of shards ran far enough, so each shard's
// estimate may err high with probability Miss/Of at most (Bonferroni's bound).
const Miss = 0.01

// Margin is the default margin of the estimate for a point split into of shards: the standard
// normal quantile at 1 − Miss/of (2.6 for 2 shards, 2.8 for 4, 3.2 for 16).
func Margin(of int) float64 {
	return distuv.UnitNormal.Quantile(1 - Miss/float64(max(of, 1)))
}

// Estimate is what the whole point has counted, erring low, when this shard has counted own:
// frames and trials scaled by Of (frames have a fixed size, so trials scale exactly), errors
// scaled by Of less Z standard deviations. The other Of−1 shards' errors have mean (Of−1)·e,
// estimated from this shard's e, and variance (Of−1)·e·D, where D is the index of dispersion of
// errors between this shard's frames (stats.Dispersion, the statistic the intervals widen by;
// 1 for independent errors, large when they come in bursts): the total Of·e has variance about
// Of·(Of−1)·e·D — the others' count's own (Of−1)·e·D plus the estimate's (Of−1)²·e·D. Bursty
// errors thus make a shard run further, by as much as its own frames show the bursts to be.
//
// When the shard sees what others have told (Seen), the estimate is estimateSeen's.
func (s Shard) Estimate(own, into *stop.Progress) {
	n := float64(s.Of)
	z := s.Z
	if z == 0 {
		z = Margin(s.Of)
	}
	if len(s.Seen) > 0 && s.Of > 1 {
		s.estimateSeen(own, into, z)
		return
	}
	into.Taps = own.Taps
	into.Frames = own.Frames * int64(s.Of)
	into.Elapsed = own.Elapsed
	if len(into.Counts) != len(own.Counts) {
		into.Counts = make([]link.Tally, len(own.Counts))
	}
	for i, c := range own.Counts {
		e := float64(c.Errors)
		low := e
		if s.Of > 1 {
			d := stats.Dispersion(c)
			switch {
			case math.IsNaN(d) && c.Errors > 0 && c.Errors < c.Trials:
				// Errors in a single frame: their spread cannot be judged yet, so count none.
				e, d = 0, 1
			case !(d > 1): // no errors, or no bursts
				d = 1
			}
			low = math.Floor(n*e - z*math.Sqrt(n*(n-1)*e*d))
		}
		into.Counts[i] = link.Tally{Trials: c.Trials * int64(s.Of), Errors: int64(math.Max(0, low))}
	}
}

// State is a point's committed prefix.
type State struct {
	Frames  int64
	Counts  []link.Tally
	Elapsed time.Duration // wall time already spent on it (time rules go on from there)
	// Log, if set, holds the prefix frame by frame (Frames of them); the point's Outcome.Log
	// goes on from it. Without it a point continued from a prefix keeps no log.
	Log *framelog.Log
}

// Outcome is how a point ended.
type Outcome struct {
	Taps     []string
	Counts   []link.Tally
	Frames   int64     // committed (a shard: its own)
	Stop     string    // the name of the rule met, Interrupted or Short
	Rule     stop.Rule // the rule met (nil when interrupted)
	Elapsed  time.Duration
	Computed int64 // frames this run computed (excluding a resumed prefix)
	// Log is the committed frames' own counts in frame order (nil for a shard, whose frames
	// are not a prefix, and for a point continued from a prefix given without its log).
	Log *framelog.Log
}

// Interrupted is the stop reason of a point ended by its context.
const Interrupted = "interrupted"

// Short is the stop reason of a replayed point whose frames ran out before a rule was met.
const Short = "short"

// Run computes the point until a rule is met or ctx ends. A block error ends the run with an
// error naming the point, frame and block.
//
// It builds the links (one per worker) and checks them (checkInstances), judges the rules on
// the starting prefix, then computes frames on one worker (serial), on several (parallel), or
// takes them from Spec.Replay, committing each in frame order (pointRun.commit).
func Run(ctx context.Context, s Spec) (Outcome, error) {
	workers := s.Workers
	if workers <= 0 {
		workers = runtime.NumCPU()
	}
	first, err := buildFirst(s)
	if err != nil {
		return Outcome{}, err
	}
	r, err := newPointRun(s, first.Taps())
	if err != nil {
		return Outcome{}, err
	}
	// The point is told started at once: the check of a script's own blocks below computes a
	// few frames before the first commit, which interpreted can take a good part of a second.
	r.progress()
	second, err := buildSecond(s, first)
	if err != nil {
		return Outcome{}, err
	}
	r.obs.Started(r.taps)
	if !r.judge() {
		switch {
		case s.Replay != nil:
			err = r.replay(ctx)
		case workers == 1:
			err = r.serial(ctx, first)
		default:
			err = r.parallel(ctx, first, second, workers)
		}
		if err != nil {
			return Outcome{}, err
		}
	}
	out := r.finish()
	r.obs.Finished(out)
	return out, nil
}

// buildFirst builds the first link and checks it and the rules.
func buildFirst(s Spec) (*link.Link, error) {
	first, err := s.Build()
	if err != nil {
		return nil, err
	}
	if err := first.Check(); err != nil {
		return nil, err
	}
	for _, r := range s.Rules {
		if c, ok := r.(link.Checked); ok {
			if err := c.Err(); err != nil {
				return nil, err
			}
		}
	}
	return first, nil
}

// buildSecond builds, unless replaying, a second link and checks that it and the first share
// nothing (checkInstances).
func buildSecond(s Spec, first *link.Link) (*link.Link, error) {
	if s.Replay != nil {
		return nil, nil
	}
	second, err := s.Build()
	if err != nil {
		return nil, err
	}
	if err := checkInstances(s, first, second); err != nil {
		return nil, err
	}
	return second, nil
}

// Extrapolate guesses how many frames in all a point needs for a rule to be met, from a
// prefix p that meets none: the counts scaled up in 5 % steps as if the rates held, plus a
// fifth for the luck of the draw. False when p has no frames or no scaling up to a million
// times meets a rule. Time rules see no time and never count.
func Extrapolate(rules []stop.Rule, p *stop.Progress) (int64, bool) {
	if p.Frames <= 0 {
		return 0, false
	}
	q := stop.Progress{Taps: p.Taps, Counts: make([]link.Tally, len(p.Counts))}
	for g := 1.05; g < 1e6; g *= 1.05 {
		q.Frames = int64(math.Ceil(float64(p.Frames) * g))
		for i, c := range p.Counts {
			q.Counts[i] = link.Tally{Trials: int64(float64(c.Trials) * g), Errors: int64(float64(c.Errors) * g)}
		}
		for _, r := range rules {
			if r.Met(&q) {
				return int64(math.Ceil(float64(q.Frames) * 1.2)), true
			}
		}
	}
	return 0, false
}
