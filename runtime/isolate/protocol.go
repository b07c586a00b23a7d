package isolate

import (
	"time"

	"tally/runtime/host"
	"tally/runtime/longrun"
	"tally/runtime/result"
)

// The parent and its child talk over two pipes, each a stream of gob values (gob, not JSON:
// a run's figures may be ±Inf or NaN, and the constellation samples are not part of run.json).
//
//	fd 3, child → parent: reports, in order
//	    pos       the statement the script last reached (sampled, sent when it changes)
//	    point     the run so far, after each finished point
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
	// long-run settings (longrun.Settings without a merge's replay)
	Long    bool
	Resume  bool
	Restart bool
	Every   time.Duration
	Shard   *longrun.Part
	Extend  bool
}

// reply is a message from the parent: an answer to done or write, or a stop.
type reply struct {
	Stop bool
	Err  string // the answer: "" accepted, else why not
}

func newJob(path string, c host.Config, memory int64) job {
	j := job{Path: path, Workers: c.Workers, Seed: c.Seed, SeedSet: c.SeedSet, Quiet: c.Quiet, Trust: c.Trust, Memory: memory}
	if l := c.Long; l != nil {
		j.Long, j.Resume, j.Restart, j.Every, j.Shard, j.Extend = true, l.Resume, l.Restart, l.Every, l.Shard, l.Extend
	}
	return j
}

func (j job) config() host.Config {
	c := host.Config{Workers: j.Workers, Seed: j.Seed, SeedSet: j.SeedSet, Quiet: j.Quiet, Trust: j.Trust}
	if j.Long {
		c.Long = &longrun.Settings{Resume: j.Resume, Restart: j.Restart, Every: j.Every, Shard: j.Shard, Extend: j.Extend}
	}
	return c
}
