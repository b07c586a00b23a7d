package isolate

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"sync"
	"time"

	"tally/runtime/compile"
	"tally/runtime/host"
	"tally/runtime/internal/wire"
	"tally/runtime/longrun"
	"tally/runtime/progress"
	"tally/runtime/result"
)

// Handover is how a run started in the interpreter goes on compiled. When the interpreted
// child reaches a link with a block of the script's own (the part of a run the interpreter
// computes many times slower), the parent builds the same bytes of the script with the Go
// toolchain (runtime/compile; imports are checked by the sandbox's rules first, so only what
// the interpreter accepts is built); the child yields the processors to the build once its run
// looks longer than a moment (pace.go). When the program is ready, and the run has more than a
// moment left, the parent asks the child to stop at its next commit boundary: the
// child saves its checkpoint (the committed prefix of the point in progress and the finished
// points) and ends without outputs; the compiled script is then started as the run's child, with
// the same job, and continues from the checkpoint. A run is defined by its committed counts, so
// the table is the same bytes as an interpreted run's. A run that ends before the build does
// simply ends interpreted; where no build can be made (no toolchain, a build error, a module the
// offline cache lacks) the run stays interpreted and says why, once.
type Handover struct {
	Cache string // the build cache ("": compile.DefaultCache())
	// At, for tests: the interpreted run hands over by itself at this point and frame (waiting
	// for the build), instead of when the build is ready.
	At *result.Spot

	mu   sync.Mutex
	said map[string]bool // reasons given already (a watch gives each once)
}

// say writes why a run stays interpreted, once per reason.
func (h *Handover) say(w io.Writer, why string) {
	h.mu.Lock()
	defer h.mu.Unlock()
	if h.said[why] {
		return
	}
	if h.said == nil {
		h.said = map[string]bool{}
	}
	h.said[why] = true
	fmt.Fprintf(w, "note: the run stays interpreted: %s\n", why)
}

// handing is one run's build and hand-over (nil: interpreted only).
type handing struct {
	h       *Handover
	src     []byte
	start   time.Time
	ready   chan struct{} // closed when the build ended
	bin     *compile.Binary
	err     error
	cancel  context.CancelFunc
	at      *result.Spot // where the run was handed over
	took    time.Duration
	quiet   bool
	skipped string // why no build can be started

	// launch starts the build (once; nil when none can be); launched says it was. Both are
	// used by the parent's goroutine only.
	launch   func()
	launched bool
}

// startBuild starts the build of the script beside its interpreted run (nil when hand-overs
// are off). The job keeps a checkpoint, which a hand-over continues from.
func (p *parent) startBuild(ctx context.Context, j *job) *handing {
	h := p.c.Handover
	if h == nil {
		return nil
	}
	hd := &handing{h: h, start: time.Now(), ready: make(chan struct{}), quiet: p.c.Host.Quiet}
	src, err := os.ReadFile(p.path)
	if err != nil || host.CheckImports(p.path, src, p.c.Host.Trust) != nil {
		// The interpreter refuses it and says why.
		hd.skipped = "the script is refused"
		close(hd.ready)
		return hd
	}
	hd.src = src
	if !j.Long {
		j.Long, j.Every = true, -1 // a checkpoint at each point's end and at the hand-over
	}
	j.Follow = true // its progress says when it may yield to the build
	if h.At != nil {
		j.HandAt = &wire.Spot{Point: h.At.Point, Frame: h.At.Frame}
	}
	bctx, cancel := context.WithCancel(ctx)
	hd.cancel = cancel
	hd.launch = func() {
		if hd.launched {
			return
		}
		hd.launched = true
		go func() {
			defer close(hd.ready)
			hd.bin, hd.err = compile.Script(bctx, compile.Request{Script: p.path, Source: src, Cache: h.Cache, Tool: host.Version})
		}()
	}
	if h.At != nil {
		hd.launch() // the test's hand-over waits for it
	}
	return hd
}

// need starts the build when the run first reaches a link with a block of the script's own (a
// point's first progress says): a link of tally's blocks alone computes at compiled speed in
// the interpreter too, so a run of such links only is not worth a build.
func (hd *handing) need(l *wire.Live) {
	if hd != nil && hd.launch != nil && l != nil && l.Custom {
		hd.launch()
	}
}

// building says whether the build is still running.
func (hd *handing) building() bool {
	if !hd.launched {
		return false
	}
	select {
	case <-hd.ready:
		return false
	default:
		return true
	}
}

// end stops a build still running when the run ends.
func (hd *handing) end() {
	if hd != nil && hd.cancel != nil {
		hd.cancel()
		if hd.launched {
			<-hd.ready // the go command's processes killed and the build's folder removed before tally ends
		}
	}
}

// readyFor is the channel that says the build ended, for the child running j: nil for a
// compiled child, and for an interpreted one that hands over by itself (Handover.At).
func (hd *handing) readyFor(j job) <-chan struct{} {
	if hd == nil || j.Continued || j.HandAt != nil {
		return nil
	}
	return hd.ready
}

// usable says, once the build ended, whether the run can be handed over; if not, it says why
// (once).
func (hd *handing) usable(log io.Writer) bool {
	if hd.err != nil {
		var u *compile.Unavailable
		if errors.As(hd.err, &u) && !hd.quiet {
			hd.h.say(log, u.Why)
		}
		return false
	}
	return hd.bin != nil
}

// record says in the finished run how it was computed.
func (hd *handing) record(r *result.Run, h *Handover) {
	if r == nil {
		return
	}
	switch {
	case h == nil:
		r.Execution = &result.Execution{How: "interpreted", Why: "hand-over turned off"}
	case hd == nil || hd.skipped != "":
		r.Execution = &result.Execution{How: "interpreted"}
	case hd.at != nil && hd.bin != nil && hd.err == nil:
		r.Execution = &result.Execution{How: "handed-over", At: hd.at}
		if !hd.bin.Cached {
			r.Execution.BuildSeconds = hd.bin.Took.Seconds()
		}
		r.Start = hd.start.UTC() // the run began in the interpreter
	default:
		e := &result.Execution{How: "interpreted", Why: "the run ended before the build"}
		if !hd.launched {
			e.Why = "its links have no block of the script's own: they compute compiled either way"
		}
		select {
		case <-hd.ready:
			var u *compile.Unavailable
			if errors.As(hd.err, &u) {
				e.Why = u.Why
			} else if hd.err == nil && hd.bin != nil {
				e.Why = "the build was ready as the run was about to end"
			}
		default:
		}
		r.Execution = e
	}
}

// next is the child that continues a run handed over: the compiled script, or, when the
// build failed after a hand-over placed by a test, the interpreter again, from the checkpoint.
func (p *parent) next(ctx context.Context, exe string, j job, hd *handing) (string, job) {
	<-hd.ready
	at := p.handedAt(j)
	hd.at = &at
	j.Resume, j.Restart, j.HandAt, j.Continued, j.Reported = true, false, nil, true, p.seen
	if !hd.usable(p.log()) {
		return exe, j
	}
	j.Source = hd.src
	if !p.c.Host.Quiet {
		how := "found built"
		if !hd.bin.Cached {
			how = "built in " + progress.Duration(hd.bin.Took)
		}
		fmt.Fprintf(p.log(), "handed over to the compiled script at point %d, frame %d (%s)\n", at.Point, at.Frame, how)
	}
	return hd.bin.Path, j
}

// handedAt reads where the interpreter stopped from the checkpoint (or shard file) it left:
// the point in progress and its committed frames.
func (p *parent) handedAt(j job) result.Spot {
	if j.Shard != nil {
		if sf, err := longrun.LoadShard(longrun.ShardPath(p.dir, *j.Shard)); err == nil {
			for _, sp := range sf.Points {
				if !sp.Done {
					return result.Spot{Point: sp.Index, Frame: sp.Frames}
				}
			}
			return result.Spot{Point: len(sf.Points)}
		}
		return result.Spot{}
	}
	ck, err := longrun.LoadCheckpoint(longrun.CheckpointPath(p.dir))
	if err != nil {
		return result.Spot{}
	}
	for _, ps := range ck.Points {
		if ps.Stop == "" {
			return result.Spot{Point: ps.Index, Frame: ps.Frames}
		}
	}
	return result.Spot{Point: len(ck.Points)}
}

func (p *parent) log() io.Writer {
	if p.c.Host.Log != nil {
		return p.c.Host.Log
	}
	return os.Stderr
}
