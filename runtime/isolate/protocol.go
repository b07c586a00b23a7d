package isolate

import (
	"tally/runtime/host"
	"tally/runtime/internal/wire"
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
//	    end       the script ended: Err empty, or the script's mistake (Pos, Err); or it
//	              stopped for a hand-over (Handover), its checkpoint saved
//	    memory    the child is over its memory limit and ends itself
//	fd 4, parent → child: the job, then replies to done and write, or a stop (Ctrl-C, a
//	    newer save; or, with Handover, the compiled program is ready to continue the run);
//	    the child ends when this pipe closes (its parent is gone)
//	fd 5, child → parent: the progress lines (the parent's own stderr when it is a file)
//
// The child's stderr carries nothing but what the Go runtime prints when the child crashes;
// the parent reads it to name the cause and never shows it.

// The messages are defined in runtime/internal/wire, which a compiled script's process (a run
// handed over to it, handover.go) speaks too.
type (
	report = wire.Report
	job    = wire.Job
	live   = wire.Live
	reply  = wire.Reply
)

var liveOf = wire.LiveOf

// Report kinds, child to parent.
const (
	kindPos    = wire.KindPos
	kindPoint  = wire.KindPoint
	kindLive   = wire.KindLive
	kindDone   = wire.KindDone
	kindWrite  = wire.KindWrite
	kindEnd    = wire.KindEnd
	kindMemory = wire.KindMemory
)

func newJob(path string, c host.Config, memory int64) job {
	j := job{Path: path, Workers: c.Workers, Seed: c.Seed, SeedSet: c.SeedSet, Quiet: c.Quiet, Trust: c.Trust, Memory: memory,
		Follow: c.OnProgress != nil, Reuse: c.Reuse, Build: host.BuildIdentity()}
	if l := c.Long; l != nil {
		j.Long, j.Resume, j.Restart, j.Every, j.Shard, j.Extend = true, l.Resume, l.Restart, l.Every, l.Shard, l.Extend
	}
	return j
}

func config(j job) host.Config {
	c := host.Config{Workers: j.Workers, Seed: j.Seed, SeedSet: j.SeedSet, Quiet: j.Quiet, Trust: j.Trust, Reported: j.Reported, Reuse: j.Reuse}
	if j.Long {
		c.Long = j.Settings()
	}
	return c
}
