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
	"sync"
	"time"

	"tally/blocks/link"
	"tally/blocks/stop"
)

// Spec is one point's work.
type Spec struct {
	Point   int                        // point index (keys the streams)
	Build   func() (*link.Link, error) // makes the link; called once per worker
	Rules   []stop.Rule                // the point ends when any is met
	Seed    uint64
	Workers int // 0 means all cores

	// Start is the committed state to continue from (resume): frames 0..Start.Frames-1 are
	// taken as done with these counts. Nil starts afresh. The rules are judged on it before
	// any frame is computed, so a point that had ended ends again, for the same rule.
	Start *State
	// Shard, when set, selects the frames this run computes: frame f is computed when
	// f % Of == Index, and Start, Outcome and OnProgress count this shard's frames only. Its
	// counts are not a prefix of the point, so the rules cannot be judged on them; see Shard
	// for when a shard ends.
	Shard *Shard
	// Replay, when set, replaces computing: frame f's counts are Replay(f), taken in frame
	// order from Start on and judged exactly as computed frames are (a merge of shards). When
	// Replay has no frame f the point ends with Stop == Short. Build is called once, for the
	// taps.
	Replay func(frame int64) ([]link.Tally, bool)
	// OnCommit, if set, is called by the committing goroutine after each frame commit with the
	// frame index and that frame's counts (not the running sum). It must be quick.
	OnCommit func(frame int64, counts []link.Tally)
	// OnTaps, if set, is told the link's tap names once the first link is built, before any
	// commit.
	OnTaps func(taps []string)
	// Where, if set, is called when a block panics, from the panicking goroutine, to name the
	// script position reached (the host's marker, or the compiled stack).
	Where func() string
	// OnProgress, if set, is called at most every ProgressEvery with the prefix state.
	OnProgress    func(p *stop.Progress)
	ProgressEvery time.Duration
}

// Shard is a deterministic share of a point's frames: frame f belongs to shard f mod Of.
//
// A shard cannot judge the rules, which hold for the whole point's prefix, so it judges them
// on an estimate of what all Of shards together have counted when it has counted its own
// share (see Estimate), and ends once a rule is met on that estimate and it has computed at
// least Min of its own frames. The merge then judges the real prefix; should the estimate
// have erred, the merge names the points that need more frames and a further round extends
// them (Min).
type Shard struct {
	Index, Of int     // this shard computes frames f with f % Of == Index
	Min       int64   // frames of this shard to compute at least
	Z         float64 // safety margin of the estimate in standard deviations (0: DefaultZ)
}

// DefaultZ is the shard estimate's margin: three standard deviations, so that a shard rarely
// ends before the merged prefix meets the rule (about 0.1 % of shard points, for an error
// count near its target; common practice, no source).
const DefaultZ = 3

// Estimate is what the whole point has counted, erring low, when this shard has counted own:
// frames and trials scaled by Of (frames have a fixed size, so trials scale exactly), errors
// scaled by Of less Z standard deviations. The other Of−1 shards' errors are Poisson-like with
// mean (Of−1)·e, estimated from this shard's e, so the total Of·e has variance about
// Of·(Of−1)·e — the count's own (Of−1)·e plus the estimate's (Of−1)²·e.
func (s Shard) Estimate(own, into *stop.Progress) {
	n := float64(s.Of)
	z := s.Z
	if z == 0 {
		z = DefaultZ
	}
	into.Taps = own.Taps
	into.Frames = own.Frames * int64(s.Of)
	into.Elapsed = own.Elapsed
	if len(into.Counts) != len(own.Counts) {
		into.Counts = make([]link.Tally, len(own.Counts))
	}
	for i, c := range own.Counts {
		e := float64(c.Errors)
		low := math.Floor(n*e - z*math.Sqrt(n*(n-1)*e))
		into.Counts[i] = link.Tally{Trials: c.Trials * int64(s.Of), Errors: int64(math.Max(0, low))}
	}
}

// State is a point's committed prefix.
type State struct {
	Frames  int64
	Counts  []link.Tally
	Elapsed time.Duration // wall time already spent on it (time rules go on from there)
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
}

// Interrupted is the stop reason of a point ended by its context.
const Interrupted = "interrupted"

// Short is the stop reason of a replayed point whose frames ran out before a rule was met.
const Short = "short"

type done struct {
	index  int64
	counts []link.Tally
	err    error
}

// Run computes the point until a rule is met or ctx ends. A block error ends the run with an
// error naming the point, frame and block.
func Run(ctx context.Context, s Spec) (Outcome, error) {
	workers := s.Workers
	if workers <= 0 {
		workers = runtime.NumCPU()
	}
	first, err := s.Build()
	if err != nil {
		return Outcome{}, err
	}
	if err := first.Check(); err != nil {
		return Outcome{}, err
	}
	taps := first.Taps()
	if s.OnTaps != nil {
		s.OnTaps(taps)
	}
	for _, r := range s.Rules {
		if c, ok := r.(link.Checked); ok {
			if err := c.Err(); err != nil {
				return Outcome{}, err
			}
		}
	}
	// A second instance, for the check that link instances share nothing (and the second
	// worker's link).
	var second *link.Link
	if s.Replay == nil {
		if second, err = s.Build(); err != nil {
			return Outcome{}, err
		}
		if err := checkInstances(s, first, second); err != nil {
			return Outcome{}, err
		}
	}
	start := time.Now()
	prog := &stop.Progress{Taps: taps, Counts: make([]link.Tally, len(taps))}
	var before time.Duration
	if s.Start != nil {
		if len(s.Start.Counts) != len(taps) {
			return Outcome{}, fmt.Errorf("point %d: the saved state has %d taps, the link %d", s.Point+1, len(s.Start.Counts), len(taps))
		}
		prog.Frames = s.Start.Frames
		copy(prog.Counts, s.Start.Counts)
		before = s.Start.Elapsed
	}
	out := Outcome{Taps: taps}

	// check judges the rules on the committed prefix (a shard: on its estimate of the prefix).
	// A replay sees no wall time: a time rule cannot be replayed, only honoured live.
	judged := prog
	var est stop.Progress
	if s.Shard != nil {
		judged = &est
	}
	check := func() bool {
		if s.Replay == nil {
			prog.Elapsed = before + time.Since(start)
		}
		if s.Shard != nil {
			s.Shard.Estimate(prog, &est)
		}
		for _, r := range s.Rules {
			if r.Met(judged) {
				out.Stop, out.Rule = r.Name(), r
				if s.Shard != nil && prog.Frames < s.Shard.Min {
					out.Stop, out.Rule = "", nil
					return false
				}
				return true
			}
		}
		return false
	}
	if check() {
		return finish(out, prog, start, before), nil
	}
	if s.Replay != nil {
		return replay(ctx, s, &out, prog, check, start, before)
	}

	frameOf := func(n int64) int64 { return n } // n-th frame this run computes → frame index
	if s.Shard != nil {
		frameOf = func(n int64) int64 { return n*int64(s.Shard.Of) + int64(s.Shard.Index) }
	}
	// commit adds frame idx's counts to the prefix and reports whether a rule is now met.
	commit := func(idx int64, counts []link.Tally) bool {
		for i := range counts {
			prog.Counts[i].Add(counts[i])
		}
		prog.Frames++
		out.Computed++
		if s.OnCommit != nil {
			s.OnCommit(idx, counts)
		}
		return check()
	}
	lastProgress := time.Now()
	progress := func() {
		if s.OnProgress != nil && time.Since(lastProgress) >= s.ProgressEvery {
			lastProgress = time.Now()
			prog.Elapsed = before + time.Since(start)
			s.OnProgress(prog)
		}
	}

	// One worker computes and commits in this goroutine: no hand-over between threads.
	if workers == 1 {
		var f link.Frame
		c := make([]link.Tally, len(taps))
		for {
			if ctx.Err() != nil {
				out.Stop = Interrupted
				break
			}
			idx := frameOf(prog.Frames)
			clear(c)
			if err := runFrame(first, &f, s, int(idx), c); err != nil {
				return Outcome{}, fmt.Errorf("point %d, frame %d: %w", s.Point+1, idx, err)
			}
			if commit(idx, c) {
				break
			}
			progress()
		}
		return finish(out, prog, start, before), nil
	}

	links := make([]*link.Link, workers)
	links[0], links[1] = first, second
	for w := 2; w < workers; w++ {
		if links[w], err = s.Build(); err != nil {
			return Outcome{}, err
		}
	}

	// The committer hands out frame indices, at most window ahead of the committed prefix, so
	// memory stays flat however unevenly frames finish.
	window := int64(4 * workers)
	jobs := make(chan int64, window)
	results := make(chan done, window)
	pctx, cancel := context.WithCancel(ctx)
	defer cancel()

	// In shard mode prog.Frames counts this shard's frames.
	next := prog.Frames
	for ; next < prog.Frames+window; next++ {
		jobs <- frameOf(next)
	}

	var wg sync.WaitGroup
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func(l *link.Link) {
			defer wg.Done()
			var f link.Frame
			for idx := range jobs {
				if pctx.Err() != nil {
					continue
				}
				c := make([]link.Tally, len(taps))
				err := runFrame(l, &f, s, int(idx), c)
				results <- done{index: idx, counts: c, err: err}
			}
		}(links[w])
	}

	pending := map[int64]done{}
	var runErr error
loop:
	for {
		select {
		case <-ctx.Done():
			out.Stop = Interrupted
			break loop
		case d := <-results:
			if d.err != nil {
				runErr = fmt.Errorf("point %d, frame %d: %w", s.Point+1, d.index, d.err)
				break loop
			}
			pending[d.index] = d
			for {
				want := frameOf(prog.Frames)
				d, ok := pending[want]
				if !ok {
					break
				}
				delete(pending, want)
				if commit(want, d.counts) {
					break loop
				}
				jobs <- frameOf(next)
				next++
			}
			progress()
		}
	}
	cancel()
	close(jobs)
	go func() { wg.Wait(); close(results) }()
	for range results {
	}
	if runErr != nil {
		return Outcome{}, runErr
	}
	return finish(out, prog, start, before), nil
}

// replay commits Spec.Replay's frames in order until a rule is met or they run out.
func replay(ctx context.Context, s Spec, out *Outcome, prog *stop.Progress, check func() bool, start time.Time, before time.Duration) (Outcome, error) {
	for {
		if ctx.Err() != nil {
			out.Stop = Interrupted
			break
		}
		f := prog.Frames
		c, ok := s.Replay(f)
		if !ok {
			out.Stop = Short
			break
		}
		if len(c) != len(prog.Counts) {
			return Outcome{}, fmt.Errorf("point %d, frame %d: %d taps saved, the link has %d", s.Point+1, f, len(c), len(prog.Counts))
		}
		for i := range c {
			prog.Counts[i].Add(c[i])
		}
		prog.Frames++
		if s.OnCommit != nil {
			s.OnCommit(f, c)
		}
		if check() {
			break
		}
	}
	return finish(*out, prog, start, before), nil
}

// runFrame runs one frame, turning a panic in a block (a script's own, say) into an error that
// names where it happened when Spec.Where can tell.
func runFrame(l *link.Link, f *link.Frame, s Spec, idx int, c []link.Tally) (err error) {
	defer func() {
		if v := recover(); v != nil {
			err = &PanicError{Value: v}
			if s.Where != nil {
				err.(*PanicError).Where = s.Where()
			}
		}
	}()
	return l.Run(f, s.Seed, s.Point, idx, c)
}

// PanicError is a panic inside a block while it processed a frame.
type PanicError struct {
	Value any
	Where string // the script position, when known
}

func (e *PanicError) Error() string { return fmt.Sprintf("panic: %v", e.Value) }

func finish(out Outcome, prog *stop.Progress, start time.Time, before time.Duration) Outcome {
	out.Counts = append([]link.Tally(nil), prog.Counts...)
	out.Frames = prog.Frames
	out.Elapsed = before + time.Since(start)
	return out
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
