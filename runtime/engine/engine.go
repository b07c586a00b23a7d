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
	"errors"
	"fmt"
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
	// taken as done with these counts. Nil starts afresh.
	Start *State
	// Shard, when set, selects the frames this run computes: frame f is computed when
	// f % Of == Index. Rules are not judged on a shard (its counts are not a prefix); it runs
	// until it has committed Limit of its own frames or the context ends.
	Shard *Shard
	// OnCommit, if set, is called by the committing goroutine after each frame commit with the
	// frame index and that frame's counts (not the running sum). It must be quick.
	OnCommit func(frame int64, counts []link.Tally)
	// OnProgress, if set, is called at most every ProgressEvery with the prefix state.
	OnProgress    func(p *stop.Progress)
	ProgressEvery time.Duration
}

// Shard is a deterministic share of a point's frames.
type Shard struct {
	Index, Of int   // this shard computes frames f with f % Of == Index
	Limit     int64 // frames of this shard to compute
}

// State is a point's committed prefix.
type State struct {
	Frames int64
	Counts []link.Tally
}

// Outcome is how a point ended.
type Outcome struct {
	Taps     []string
	Counts   []link.Tally
	Frames   int64
	Stop     string    // the name of the rule met, or "interrupted"
	Rule     stop.Rule // the rule met (nil when interrupted)
	Elapsed  time.Duration
	Computed int64 // frames this run computed (excluding a resumed prefix)
}

// Interrupted is the stop reason of a point ended by its context.
const Interrupted = "interrupted"

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
	for _, r := range s.Rules {
		if c, ok := r.(link.Checked); ok {
			if err := c.Err(); err != nil {
				return Outcome{}, err
			}
		}
	}
	links := make([]*link.Link, workers)
	links[0] = first
	for w := 1; w < workers; w++ {
		if links[w], err = s.Build(); err != nil {
			return Outcome{}, err
		}
	}

	start := time.Now()
	prog := &stop.Progress{Taps: taps, Counts: make([]link.Tally, len(taps))}
	if s.Start != nil {
		prog.Frames = s.Start.Frames
		copy(prog.Counts, s.Start.Counts)
	}
	out := Outcome{Taps: taps}

	// check judges the rules on the committed prefix.
	check := func() bool {
		if s.Shard != nil {
			return prog.Frames >= s.Shard.Limit
		}
		prog.Elapsed = time.Since(start)
		for _, r := range s.Rules {
			if r.Met(prog) {
				out.Stop, out.Rule = r.Name(), r
				return true
			}
		}
		return false
	}
	if check() {
		return finish(out, prog, start), nil
	}

	// The committer hands out frame indices, at most window ahead of the committed prefix, so
	// memory stays flat however unevenly frames finish.
	window := int64(4 * workers)
	jobs := make(chan int64, window)
	results := make(chan done, window)
	pctx, cancel := context.WithCancel(ctx)
	defer cancel()

	frameOf := func(n int64) int64 { return n } // n-th frame this run computes → frame index
	if s.Shard != nil {
		frameOf = func(n int64) int64 { return n*int64(s.Shard.Of) + int64(s.Shard.Index) }
	}
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
				err := l.Run(&f, s.Seed, s.Point, int(idx), c)
				results <- done{index: idx, counts: c, err: err}
			}
		}(links[w])
	}

	pending := map[int64]done{}
	lastProgress := time.Now()
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
				for i := range d.counts {
					prog.Counts[i].Trials += d.counts[i].Trials
					prog.Counts[i].Errors += d.counts[i].Errors
				}
				prog.Frames++
				out.Computed++
				if s.OnCommit != nil {
					s.OnCommit(want, d.counts)
				}
				if check() {
					break loop
				}
				jobs <- frameOf(next)
				next++
			}
			if s.OnProgress != nil && time.Since(lastProgress) >= s.ProgressEvery {
				lastProgress = time.Now()
				prog.Elapsed = time.Since(start)
				s.OnProgress(prog)
			}
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
	return finish(out, prog, start), nil
}

func finish(out Outcome, prog *stop.Progress, start time.Time) Outcome {
	out.Counts = append([]link.Tally(nil), prog.Counts...)
	out.Frames = prog.Frames
	out.Elapsed = time.Since(start)
	return out
}

// ErrNoRules is returned by callers that refuse a point with nothing to end it.
var ErrNoRules = errors.New("no stop rule: the point would never end")
