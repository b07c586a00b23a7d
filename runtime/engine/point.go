package engine

import (
	"context"
	"errors"
	"fmt"
	"sync"
	"time"

	"tally/blocks/link"
	"tally/blocks/stop"
	"tally/runtime/framelog"
)

// pointRun is one point being computed: its committed prefix, the rules' verdict on it, and
// the observers told of each commit.
type pointRun struct {
	s    Spec
	obs  Observers
	taps []string
	prog *stop.Progress // the committed prefix (a shard: its own frames)
	// judged is what the rules see: the prefix, or a shard's estimate of it (est).
	judged *stop.Progress
	est    stop.Progress
	out    Outcome
	start  time.Time
	before time.Duration // wall time spent on the point before this run (resume)
	shown  time.Time     // when Progress was last told (zero: never)
	// toldFrames says Progress was told a frame this run committed; startFrames are the
	// prefix's frames when it began (a resumed point's).
	toldFrames  bool
	startFrames int64
	log         *framelog.Log // the committed frames, one by one (nil: not kept)
}

func newPointRun(s Spec, taps []string) (*pointRun, error) {
	r := &pointRun{s: s, obs: Observers(s.Observers), taps: taps, out: Outcome{Taps: taps}}
	r.prog = &stop.Progress{Taps: taps, Counts: make([]link.Tally, len(taps))}
	if s.Start != nil {
		if len(s.Start.Counts) != len(taps) {
			return nil, fmt.Errorf("%s: the saved state has %d taps, the link %d", s.name(), len(s.Start.Counts), len(taps))
		}
		r.prog.Frames = s.Start.Frames
		copy(r.prog.Counts, s.Start.Counts)
		r.before = s.Start.Elapsed
	}
	r.judged = r.prog
	if s.Shard != nil {
		r.judged = &r.est
	}
	switch {
	case s.Shard != nil:
	case s.Start == nil || s.Start.Frames == 0:
		r.log = framelog.New(len(taps))
	case s.Start.Log != nil && s.Start.Log.Frames == s.Start.Frames && s.Start.Log.Taps == len(taps):
		r.log = s.Start.Log
	}
	r.start = time.Now()
	r.startFrames = r.prog.Frames
	return r, nil
}

// judge judges the rules on the committed prefix (a shard: on its estimate of the prefix) and
// reports whether one is met. A replay sees no wall time: a time rule cannot be replayed, only
// honoured live.
func (r *pointRun) judge() bool {
	s := r.s
	if s.Replay == nil {
		r.prog.Elapsed = r.before + time.Since(r.start)
	}
	if s.Shard != nil {
		s.Shard.Estimate(r.prog, &r.est)
	}
	for _, rule := range s.Rules {
		if rule.Met(r.judged) {
			r.out.Stop, r.out.Rule = rule.Name(), rule
			if s.Shard != nil && r.prog.Frames < s.Shard.Min {
				r.out.Stop, r.out.Rule = "", nil
				return false
			}
			return true
		}
	}
	return false
}

// commit adds frame idx's counts to the prefix, tells the observers, and reports whether a
// rule is now met.
func (r *pointRun) commit(idx int64, counts []link.Tally, computed bool) bool {
	for i := range counts {
		r.prog.Counts[i].Add(counts[i])
	}
	r.prog.Frames++
	if r.log != nil {
		r.log.Add(counts)
	}
	if computed {
		r.out.Computed++
	}
	r.obs.Committed(idx, counts)
	return r.judge()
}

// progress tells the observers the prefix, at most every ProgressEvery, and at once when the
// point starts and when its first frame is committed (a run shows it is alive).
func (r *pointRun) progress() {
	if len(r.obs) == 0 {
		return
	}
	first := !r.toldFrames && r.prog.Frames > r.startFrames
	if first || time.Since(r.shown) >= r.s.ProgressEvery {
		r.shown, r.toldFrames = time.Now(), r.toldFrames || first
		r.prog.Elapsed = r.before + time.Since(r.start)
		r.obs.Progress(r.prog)
	}
}

func (r *pointRun) interrupted() { r.out.Stop = Interrupted }

// finish is the outcome: the prefix's counts and frames, and the wall time in all.
func (r *pointRun) finish() Outcome {
	out := r.out
	out.Counts = append([]link.Tally(nil), r.prog.Counts...)
	out.Frames = r.prog.Frames
	out.Log = r.log
	out.Elapsed = r.before + time.Since(r.start)
	return out
}

// frameOf is the frame index of the n-th frame this run computes (a shard computes every
// Of-th frame).
func (r *pointRun) frameOf(n int64) int64 {
	if sh := r.s.Shard; sh != nil {
		return n*int64(sh.Of) + int64(sh.Index)
	}
	return n
}

// serial computes and commits on this goroutine: one worker, no hand-over between threads.
func (r *pointRun) serial(ctx context.Context, l *link.Link) error {
	var f link.Frame
	c := make([]link.Tally, len(r.taps))
	for {
		if ctx.Err() != nil {
			r.interrupted()
			return nil
		}
		idx := r.frameOf(r.prog.Frames)
		clear(c)
		if err := runFrame(l, &f, r.s, int(idx), c); err != nil {
			return fmt.Errorf("%s, frame %d: %w", r.s.name(), idx, err)
		}
		if r.commit(idx, c, true) {
			return nil
		}
		r.progress()
	}
}

type done struct {
	index  int64
	counts []link.Tally
	err    error
}

// parallel computes frames on workers links (first and second built already) and commits
// them in frame order on this goroutine.
func (r *pointRun) parallel(ctx context.Context, first, second *link.Link, workers int) error {
	links := make([]*link.Link, workers)
	links[0], links[1] = first, second
	for w := 2; w < workers; w++ {
		var err error
		if links[w], err = r.s.Build(); err != nil {
			return err
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
	next := r.prog.Frames
	for ; next < r.prog.Frames+window; next++ {
		jobs <- r.frameOf(next)
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
				c := make([]link.Tally, len(r.taps))
				err := runFrame(l, &f, r.s, int(idx), c)
				results <- done{index: idx, counts: c, err: err}
			}
		}(links[w])
	}

	pending := map[int64]done{}
	var runErr, failErr error
	var failed int64
loop:
	for {
		select {
		case <-ctx.Done():
			r.interrupted()
			break loop
		case d := <-results:
			// An error is reported when its frame's turn to commit comes, as a serial run
			// would: the first failing frame in order, whatever the number of workers.
			pending[d.index] = d
			for {
				want := r.frameOf(r.prog.Frames)
				d, ok := pending[want]
				if !ok {
					break
				}
				delete(pending, want)
				if d.err != nil {
					failed, failErr = want, d.err
					runErr = fmt.Errorf("%s, frame %d: %w", r.s.name(), want, d.err)
					break loop
				}
				if r.commit(want, d.counts, true) {
					break loop
				}
				jobs <- r.frameOf(next)
				next++
			}
			r.progress()
		}
	}
	cancel()
	close(jobs)
	go func() { wg.Wait(); close(results) }()
	for range results {
	}
	var pe *PanicError
	if errors.As(failErr, &pe) && r.s.Where != nil {
		// While the frame failed, other workers went on through the script and may have moved
		// the position Where reads: run the frame once more, alone (its streams are keyed by
		// the frame, so it fails again the same way), for the position of this failure.
		var f link.Frame
		var again *PanicError
		if err := runFrame(links[0], &f, r.s, int(failed), make([]link.Tally, len(r.taps))); errors.As(err, &again) {
			pe.Where = again.Where
		}
	}
	return runErr
}

// replay commits Spec.Replay's frames in order until a rule is met or they run out.
func (r *pointRun) replay(ctx context.Context) error {
	for {
		if ctx.Err() != nil {
			r.interrupted()
			return nil
		}
		f := r.prog.Frames
		c, ok := r.s.Replay(f)
		if !ok {
			r.out.Stop = Short
			return nil
		}
		if len(c) != len(r.prog.Counts) {
			return fmt.Errorf("%s, frame %d: %d taps saved, the link has %d", r.s.name(), f, len(c), len(r.prog.Counts))
		}
		if r.commit(f, c, false) {
			return nil
		}
	}
}
