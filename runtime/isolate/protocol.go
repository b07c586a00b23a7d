package isolate

import (
	"time"

	"tally/blocks/stop"
	"tally/runtime/host"
	"tally/runtime/longrun"
	"tally/runtime/progress"
	"tally/runtime/result"
)

// The parent and its child talk over two pipes, each a stream of gob values (gob, not JSON:
// a run's figures may be ±Inf or NaN, and the constellation samples are not part of run.json).
//
//	fd 3, child → parent: reports, in order
//	    pos       the statement the script last reached (sampled, sent when it changes)
//	    point     the run so far and the sweep's number of points, after each point (skipped
//	              and interrupted ones too: the parent's OnPoint sees what the run's did)
//	    progress  the running point's committed prefix and what its goal is read from, as often
//	              as the engine tells it (progress.Every); sent only when the parent asked
//	              (its OnProgress is set)
//	    done      the finished run; the parent answers with a reply (its Done's verdict)
//	    write     the run's outputs are due in Dir; the parent writes them and replies
//	    end       the script ended: Err empty, or the script's mistake (Pos, Err)
//	    memory    the child is over its memory limit and ends itself
//	fd 4, parent → child: the job, then replies to done and write, or a stop (Ctrl-C, a
//	    newer save); the child ends when this pipe closes (its parent is gone)
//	fd 5, child → parent: the progress lines (the parent's own stderr when it is a file)
//
// The child's stderr carries nothing but what the Go runtime prints when the child crashes;
// the parent reads it to name the cause and never shows it.

// Report kinds, child to parent.
const (
	kindPos    = "pos"
	kindPoint  = "point"
	kindLive   = "progress"
	kindDone   = "done"
	kindWrite  = "write"
	kindEnd    = "end"
	kindMemory = "memory"
)

// report is one message from the child.
type report struct {
	Kind        string
	Pos         string      // pos, end: file:line:col
	Err         string      // end: the mistake, "" when the script ended well
	Script      bool        // end: Err is a mistake in the script (at Pos)
	Interrupted bool        // end: the run was stopped by the parent
	Run         *result.Run // point, done
	Total       int         // point: points in the sweep
	Live        *live       // progress
	Dir         string      // write
	Bytes       int64       // memory: what the child held
}

// job is what the child is to run: the command line's settings, no writer and no callback.
type job struct {
	Path    string
	Workers int
	Seed    uint64
	SeedSet bool
	Quiet   bool
	Trust   bool
	Memory  int64 // bytes
	Follow  bool  // send progress messages (the parent has an OnProgress)
	Reuse   bool  // host.Config.Reuse
	// long-run settings (longrun.Settings without a merge's replay)
	Long    bool
	Resume  bool
	Restart bool
	Every   time.Duration
	Shard   *longrun.Part
	Extend  bool
}

// live is a progress message: progress.Point without its rules, which are script values the
// pipe cannot carry, but with the rules a goal and the time left are read from
// (progress.Goals, progress.Left); and the engine's prefix.
type live struct {
	Label        string
	Index, Total int
	Confidence   float64
	Method       string
	Errors       []stop.ErrorTarget
	Bits         []stop.BitCap
	Time         []stop.TimeLimit
	Prefix       stop.Progress
}

func liveOf(p progress.Point, pr *stop.Progress) *live {
	l := &live{Label: p.Label, Index: p.Index, Total: p.Total, Confidence: p.Confidence, Method: p.Method, Prefix: *pr}
	for _, r := range p.Rules {
		switch r := r.(type) {
		case *stop.ErrorTarget:
			l.Errors = append(l.Errors, *r)
		case *stop.BitCap:
			l.Bits = append(l.Bits, *r)
		case *stop.TimeLimit:
			l.Time = append(l.Time, *r)
		}
	}
	return l
}

// point is the progress.Point the parent hands its OnProgress.
func (l *live) point() progress.Point {
	p := progress.Point{Label: l.Label, Index: l.Index, Total: l.Total, Confidence: l.Confidence, Method: l.Method}
	for i := range l.Errors {
		p.Rules = append(p.Rules, &l.Errors[i])
	}
	for i := range l.Bits {
		p.Rules = append(p.Rules, &l.Bits[i])
	}
	for i := range l.Time {
		p.Rules = append(p.Rules, &l.Time[i])
	}
	return p
}

// reply is a message from the parent: an answer to done or write, or a stop.
type reply struct {
	Stop bool
	Err  string // the answer: "" accepted, else why not
}

func newJob(path string, c host.Config, memory int64) job {
	j := job{Path: path, Workers: c.Workers, Seed: c.Seed, SeedSet: c.SeedSet, Quiet: c.Quiet, Trust: c.Trust, Memory: memory,
		Follow: c.OnProgress != nil, Reuse: c.Reuse}
	if l := c.Long; l != nil {
		j.Long, j.Resume, j.Restart, j.Every, j.Shard, j.Extend = true, l.Resume, l.Restart, l.Every, l.Shard, l.Extend
	}
	return j
}

func (j job) config() host.Config {
	c := host.Config{Workers: j.Workers, Seed: j.Seed, SeedSet: j.SeedSet, Quiet: j.Quiet, Trust: j.Trust, Reuse: j.Reuse}
	if j.Long {
		c.Long = &longrun.Settings{Resume: j.Resume, Restart: j.Restart, Every: j.Every, Shard: j.Shard, Extend: j.Extend}
	}
	return c
}
