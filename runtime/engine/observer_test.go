package engine

import (
	"context"
	"testing"
	"time"

	"tally/blocks/link"
	"tally/blocks/stop"
)

// recorder keeps what an observer is told.
type recorder struct {
	calls    []string
	taps     []string
	frames   []int64
	sum      []link.Tally
	progress int
	out      Outcome
}

func (r *recorder) Started(taps []string) {
	r.calls = append(r.calls, "started")
	r.taps = taps
	r.sum = make([]link.Tally, len(taps))
}

func (r *recorder) Committed(f int64, c []link.Tally) {
	r.frames = append(r.frames, f)
	for i := range c {
		r.sum[i].Add(c[i])
	}
}

func (r *recorder) Progress(p *stop.Progress) { r.progress++ }

func (r *recorder) Finished(out Outcome) {
	r.calls = append(r.calls, "finished")
	r.out = out
}

// Every observer is told the taps first, then each commit in frame order (the sum of which is
// the outcome's counts), the prefix between commits, and the outcome last; for 1 and 4 workers.
func TestObserversSeeCommitsInOrder(t *testing.T) {
	for _, w := range []int{1, 4} {
		a, b := &recorder{}, &recorder{}
		out, err := Run(context.Background(), Spec{Point: testPoint, Seed: testSeed, Workers: w, Build: testLink(0.02),
			Rules: []stop.Rule{stop.Errors(30)}, Observers: []Observer{a, b}})
		if err != nil {
			t.Fatal(err)
		}
		for _, r := range []*recorder{a, b} {
			if len(r.calls) != 2 || r.calls[0] != "started" || r.calls[1] != "finished" || len(r.taps) != 2 {
				t.Errorf("workers %d: calls %v, taps %v", w, r.calls, r.taps)
			}
			for n, f := range r.frames {
				if f != int64(n) {
					t.Fatalf("workers %d: commit %d was frame %d", w, n, f)
				}
			}
			if int64(len(r.frames)) != out.Frames || !equal(r.sum, out.Counts) || r.out.Frames != out.Frames || r.out.Stop != "errors" {
				t.Errorf("workers %d: %d commits summing to %v; outcome %d frames %v (told %+v)", w, len(r.frames), r.sum, out.Frames, out.Counts, r.out)
			}
			if r.progress == 0 {
				t.Errorf("workers %d: no progress told (ProgressEvery 0)", w)
			}
		}
	}
}

// prefixes keeps the frame count of every prefix it is told.
type prefixes struct {
	Ignore
	frames []int64
}

func (p *prefixes) Progress(pr *stop.Progress) { p.frames = append(p.frames, pr.Frames) }

// However long ProgressEvery, a point is told as it starts (no frame yet: the check of a
// script's own blocks may take several frames' time first) and at its first commit, so a run
// shows at once that it is alive; after that at most every ProgressEvery.
func TestProgressToldAtStartAndFirstCommit(t *testing.T) {
	for _, w := range []int{1, 4} {
		p := &prefixes{}
		_, err := Run(context.Background(), Spec{Point: testPoint, Seed: testSeed, Workers: w, Build: bscLink(0.02, false),
			Rules: []stop.Rule{stop.Errors(30)}, Observers: []Observer{p}, ProgressEvery: time.Hour})
		if err != nil {
			t.Fatal(err)
		}
		if len(p.frames) != 2 || p.frames[0] != 0 || p.frames[1] < 1 {
			t.Errorf("workers %d: told prefixes of %v frames; want [0 n≥1]", w, p.frames)
		}
	}
}
