// Package isolate runs each experiment in a child process of the same binary, so that nothing
// a script does can take tally down with it.
//
// The parent starts its own executable with a marker in the environment; the child (Serve)
// runs the script in the interpreter host and reports back over a pipe: where the script is,
// each finished point, the finished run. The parent alone writes the outputs, from what it
// received, so a child that crashes, overflows its stack, runs out of memory or is killed never
// leaves a half-written folder, and goroutines a script starts end with its child. A crash is
// told as file:line:col: and a plain sentence, never the Go runtime's trace.
//
// See protocol.go for the messages.
package isolate

import (
	"bytes"
	"context"
	"encoding/gob"
	"errors"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"time"

	"tally/runtime/host"
	"tally/runtime/longrun"
	"tally/runtime/output"
	"tally/runtime/result"
)

// DefaultGrace is how long a stopped child may take to end (and hand over its finished points)
// before it is killed. The interpreter host gives a script stuck in its own loop 3 s.
const DefaultGrace = 5 * time.Second

// Config is how a run is isolated.
type Config struct {
	Host   host.Config   // the run's settings and callbacks, as for host.Run
	Memory int64         // bytes the run may use (0: DefaultMemory)
	Grace  time.Duration // after a stop, how long before the child is killed (0: DefaultGrace)
	Exe    string        // the binary to start (default: this one)
	// Handover, if set, builds the script beside its interpreted run and hands the run over
	// to the compiled script when it is ready (handover.go); nil runs interpreted only.
	Handover *Handover
	// Also, if set, writes more files into the folder of a finished, not interrupted run, after
	// its outputs and under the folder's lock (tally run -html: index.html); an error fails the
	// run as a failed write does.
	Also func(dir string, r *result.Run) error
}

// Interrupted is the error of a run stopped by its caller (Ctrl-C): it says what was written.
type Interrupted struct {
	Points int    // finished points written
	Dir    string // where
	Shard  string // a shard run: its shard file, which keeps the committed frames
	Resume string // how to continue ("" when there is nothing to continue from)
}

func (e *Interrupted) Error() string {
	var s string
	switch {
	case e.Shard != "":
		s = "interrupted: the shard's committed frames are saved in " + e.Shard
	case e.Points == 0:
		s = "interrupted before any point finished: no outputs written"
	default:
		s = fmt.Sprintf("interrupted: %d finished point(s) written to %s%c", e.Points, e.Dir, filepath.Separator)
	}
	if e.Resume != "" {
		s += "; " + e.Resume
	}
	return s
}

func (e *Interrupted) Unwrap() error { return host.ErrInterrupted }

// Run runs the script at path in a child process, like host.Run in this one: the same
// settings, the same Done and the same outputs, with the run's memory bounded.
func Run(ctx context.Context, path string, c Config) error {
	if c.Memory <= 0 {
		c.Memory = DefaultMemory()
	}
	if c.Grace <= 0 {
		c.Grace = DefaultGrace
	}
	exe := c.Exe
	if exe == "" {
		var err error
		if exe, err = os.Executable(); err != nil {
			return fmt.Errorf("tally: cannot find its own executable to start the run: %w", err)
		}
	}
	if _, err := os.Stat(path); err != nil {
		return err
	}
	p := &parent{path: path, c: c, dir: output.Dir(path)}
	if c.Host.Long != nil {
		p.shard = c.Host.Long.Shard
	}
	release, err := Lock(p.dir, lockName(p.shard))
	if err != nil {
		return err
	}
	defer release()
	cleanTemps(p.dir, p.shard)
	ck := longrun.CheckpointPath(p.dir)
	before, _ := os.Stat(ck)
	err = p.run(ctx, exe)
	// A checkpoint this run left is kept only when -resume can continue it.
	if after, serr := os.Stat(ck); serr == nil && err != nil && (before == nil || !after.ModTime().Equal(before.ModTime()) || after.Size() != before.Size()) {
		var ie *Interrupted
		switch {
		case errors.As(err, &ie) && committed(ck):
			ie.Resume = fmt.Sprintf("tally run -resume %s continues from %s", path, ck)
		case p.resumable:
			err = &host.ScriptError{Pos: p.pos, Msg: fmt.Sprintf("%s; its finished frames are kept in %s: tally run -resume %s continues", errMsg(err), ck, path)}
		default:
			os.Remove(ck)
		}
	}
	return err
}

// committed says whether a checkpoint holds any committed frame.
func committed(path string) bool {
	ck, err := longrun.LoadCheckpoint(path)
	if err != nil {
		return false
	}
	for _, p := range ck.Points {
		if p.Frames > 0 {
			return true
		}
	}
	return false
}

func errMsg(err error) string {
	var se *host.ScriptError
	if errors.As(err, &se) {
		return se.Msg
	}
	return err.Error()
}

type parent struct {
	path  string
	c     Config
	dir   string
	shard *longrun.Part

	seen     int         // points passed on to the callbacks (a hand-over's successor repeats them)
	pos      string      // the statement the script last reached
	partial  *result.Run // the run so far (finished points)
	got      *result.Run // the finished run (done)
	doneErr  error       // what Done answered
	written  bool        // the outputs were written
	writeErr error
	// resumable: the run failed for a reason outside the script's logic (memory, a kill, a
	// race between workers), so its checkpoint is worth continuing.
	resumable bool
}

// run runs the job in a child of exe; when the compiled script is ready to take the run over
// (handover.go), in a second child, the compiled script, from where the first stopped.
func (p *parent) run(ctx context.Context, exe string) error {
	j := newJob(p.path, p.c.Host, p.c.Memory)
	hd := p.startBuild(ctx, &j)
	defer hd.end()
	for {
		err, handed := p.stage(ctx, exe, j, hd)
		if !handed {
			return err
		}
		exe, j = p.next(ctx, exe, j, hd)
		if ctx.Err() != nil {
			// Ctrl-C while the run waited for its build: it stops where the interpreter
			// left it, the checkpoint kept for -resume.
			return p.interrupted()
		}
	}
}

// stage runs one child: the interpreter's, or the compiled script's continuing a run. handed
// is true when the child stopped for a hand-over, its checkpoint saved.
func (p *parent) stage(ctx context.Context, exe string, j job, hd *handing) (err error, handed bool) {
	reportsR, reportsW, err := os.Pipe()
	if err != nil {
		return err, false
	}
	defer reportsR.Close()
	ctlR, ctlW, err := os.Pipe()
	if err != nil {
		reportsW.Close()
		return err, false
	}
	defer ctlW.Close()
	log := p.c.Host.Log
	if log == nil {
		log = os.Stderr
	}
	logW, copyLog, err := fileFor(log)
	if err != nil {
		reportsW.Close()
		ctlR.Close()
		return err, false
	}
	cmd := exec.Command(exe)
	cmd.Env = append(os.Environ(), envChild+"="+protocol)
	cmd.Stdout = p.c.Host.Stdout
	if cmd.Stdout == nil {
		cmd.Stdout = os.Stdout
	}
	crash := &capped{max: 1 << 20}
	cmd.Stderr = crash
	cmd.ExtraFiles = []*os.File{reportsW, ctlR, logW}
	cmd.SysProcAttr = childAttr()
	// A process a trusted script started may hold the child's stdout: stop waiting for it.
	cmd.WaitDelay = time.Second
	err = cmd.Start()
	reportsW.Close()
	ctlR.Close()
	if copyLog != nil {
		logW.Close()
	}
	if err != nil {
		if copyLog != nil {
			copyLog()
		}
		return fmt.Errorf("tally: cannot start the run: %w", err), false
	}
	ctl := gob.NewEncoder(ctlW)
	ctl.Encode(j)

	reports := make(chan report)
	go func() {
		defer close(reports)
		dec := gob.NewDecoder(reportsR)
		for {
			var r report
			if dec.Decode(&r) != nil {
				return
			}
			reports <- r
		}
	}()
	waited := make(chan error, 1)

	var end *report
	var memory *report
	stopped, killed := false, false
	var grace <-chan time.Time
	rss := time.NewTicker(250 * time.Millisecond)
	defer rss.Stop()
	overRSS := int64(0)
	done := ctx.Done()
	ready := hd.readyFor(j)
	// An interpreted child that will hand over yields the processors to the build once its
	// run looks longer than a moment (pace), and is handed over once the build is ready and
	// the run has more than a moment left: a short run ends interpreted, unhindered.
	pc := newPace(time.Now())
	yielding := ready != nil || j.HandAt != nil
	var blind <-chan time.Time
	if yielding {
		blind = time.After(yieldBlind)
	}
	built, handing := false, false
	consider := func() {
		now := time.Now()
		if yielding && hd.building() && pc.shouldYield(now) {
			yieldCPU(cmd.Process.Pid)
			yielding = false
		}
		if built && !handing && !stopped && p.got == nil && pc.shouldHand(now) {
			handing = true
			ctl.Encode(reply{Stop: true, Handover: true})
		}
	}
	kill := func() {
		if !killed {
			killed = true
			cmd.Process.Kill()
		}
	}
loop:
	for {
		select {
		case r, ok := <-reports:
			if !ok {
				break loop
			}
			switch r.Kind {
			case kindPos:
				p.pos = r.Pos
			case kindPoint:
				if len(r.Run.Points) <= p.seen {
					continue // a point the run reported before its hand-over
				}
				p.seen = len(r.Run.Points)
				pc.point(r.Total, time.Now())
				consider()
				// As in host.Run: Point after each point that ended (not skipped, not
				// interrupted), OnPoint after every point.
				if n := len(r.Run.Points); n > 0 && r.Run.Points[n-1].Stop != "interrupted" && r.Run.Points[n-1].Stop != "skipped" {
					p.partial = r.Run
					if p.c.Host.Point != nil {
						p.c.Host.Point(r.Run)
					}
				}
				if p.c.Host.OnPoint != nil {
					p.c.Host.OnPoint(r.Run, r.Total)
				}
			case kindLive:
				if r.Live != nil {
					hd.need(r.Live)
					pc.live(r.Live, time.Now())
				}
				consider()
				if p.c.Host.OnProgress != nil && r.Live != nil {
					pr := r.Live.Prefix
					p.c.Host.OnProgress(r.Live.Point(), &pr)
				}
			case kindDone:
				p.got = r.Run
				hd.record(r.Run, p.c.Handover)
				if p.c.Host.Done != nil {
					p.doneErr = p.c.Host.Done(r.Run)
				}
				ctl.Encode(reply{Err: errText(p.doneErr)})
			case kindWrite:
				if p.got != nil && p.got.Interrupted && finished(p.got) == 0 {
					// Outputs without a finished point would only replace good ones with
					// nothing; the checkpoint keeps what the point did.
					ctl.Encode(reply{})
					continue
				}
				p.writeErr = p.write(r.Dir, p.got)
				ctl.Encode(reply{Err: errText(p.writeErr)})
			case kindEnd:
				end = &r
			case kindMemory:
				memory = &r
			}
		case <-done:
			done = nil
			stopped = true
			ctl.Encode(reply{Stop: true})
			grace = time.After(p.c.Grace)
		case <-ready:
			// The compiled script is built (or cannot be): hand the run over to it, unless
			// the run is about to end.
			ready = nil
			built = hd.usable(p.log())
			consider()
		case <-blind:
			blind = nil
			consider()
		case <-grace:
			kill()
		case <-rss.C:
			// The child watches its own heap; this catches what it cannot see in time.
			if n := residentBytes(cmd.Process.Pid); n > p.c.Memory+p.c.Memory/4 {
				overRSS = n
				kill()
			}
		}
	}
	go func() { waited <- cmd.Wait() }()
	var werr error
	select {
	case werr = <-waited:
	case <-time.After(p.c.Grace):
		kill()
		werr = <-waited
	}
	if copyLog != nil {
		copyLog()
	}
	cleanTemps(p.dir, p.shard) // what a killed child was writing

	if memory != nil || overRSS > 0 {
		p.resumable = true
		held := overRSS
		if memory != nil {
			held = memory.Bytes
		}
		return p.failure(fmt.Sprintf("the run used %s of memory, over its limit of %s (-memory raises it): a frame, a table or a slice of the script too large?", Size(held), Size(p.c.Memory))), false
	}
	if end != nil && end.Interrupted && end.Handover && !stopped { // Ctrl-C after the request: the run stops
		return nil, true
	}
	if end == nil {
		if stopped {
			return p.interrupted(), false
		}
		msg, resumable := crashMessage(crash.Bytes(), werr)
		p.resumable = resumable
		return p.failure(msg), false
	}
	switch {
	case end.Interrupted:
		return p.interrupted(), false
	case end.Err != "":
		if p.doneErr != nil && end.Err == p.doneErr.Error() {
			return p.doneErr, false
		}
		if p.writeErr != nil && end.Err == p.writeErr.Error() {
			p.resumable = true // a full disk, say: the frames are worth keeping
			return p.writeErr, false
		}
		if end.Script {
			return &host.ScriptError{Pos: end.Pos, Msg: end.Err}, false
		}
		p.resumable = true
		return errors.New(end.Err), false
	case werr != nil && !killed:
		// The script ended well but the process did not: a goroutine the script started
		// crashed it on the way out.
		msg, _ := crashMessage(crash.Bytes(), werr)
		return p.failure(msg), false
	}
	if crash.Len() > 0 {
		log.Write(crash.Bytes()) // a trusted script's own writes to stderr
	}
	return nil, false
}

// failure is a run that ended without the script's say: at the statement it last reached.
func (p *parent) failure(msg string) error {
	return &host.ScriptError{Pos: p.pos, Msg: msg}
}

// interrupted writes the finished points of a stopped run, if the child could not, and says
// honestly what was written.
func (p *parent) interrupted() error {
	if p.shard != nil {
		return &Interrupted{Shard: longrun.ShardPath(p.dir, *p.shard),
			Resume: fmt.Sprintf("tally run -shard %s -extend %s continues it", p.shard, p.path)}
	}
	// The child could not end the run (a block stuck in its own loop): write the points it
	// reported finished.
	if p.got == nil && p.partial != nil && finished(p.partial) > 0 {
		r := p.partial
		r.Interrupted = true
		r.End = time.Now().UTC()
		ok := true
		if p.c.Host.Done != nil {
			ok = p.c.Host.Done(r) == nil
		}
		if ok {
			if err := p.write(p.dir, r); err != nil {
				return err
			}
			p.got = r
		}
	}
	e := &Interrupted{Dir: p.dir}
	if p.written && p.got != nil {
		e.Points = finished(p.got)
	}
	return e
}

// write writes a run's outputs; dir must be the script's outputs folder or beside it.
func (p *parent) write(dir string, r *result.Run) error {
	if r == nil {
		return errors.New("tally: the run asked for its outputs before it finished")
	}
	if filepath.Clean(filepath.Dir(dir)) != filepath.Clean(filepath.Dir(p.dir)) {
		return fmt.Errorf("tally: the run asked to write outside the folder of its script (%s)", dir)
	}
	if err := output.Write(dir, r); err != nil {
		return err
	}
	p.written = true
	if p.c.Also != nil && !r.Interrupted {
		return p.c.Also(dir, r)
	}
	return nil
}

// finished counts the points that ran to their stop rule.
func finished(r *result.Run) int {
	n := 0
	for _, pt := range r.Points {
		if pt.Stop != "" && pt.Stop != "interrupted" && pt.Stop != "skipped" {
			n++
		}
	}
	return n
}

func errText(err error) string {
	if err == nil {
		return ""
	}
	return err.Error()
}

// fileFor gives a file the child can write w's lines to: w itself when it is a file, else a
// pipe copied into w (copy waits for the copy to end once the child has ended).
func fileFor(w io.Writer) (f *os.File, copy func(), err error) {
	if f, ok := w.(*os.File); ok {
		return f, nil, nil
	}
	r, wr, err := os.Pipe()
	if err != nil {
		return nil, nil, err
	}
	ended := make(chan struct{})
	go func() {
		io.Copy(w, r)
		r.Close()
		close(ended)
	}()
	return wr, func() { <-ended }, nil
}

// capped keeps the first max bytes written to it.
type capped struct {
	bytes.Buffer
	max int
}

func (c *capped) Write(b []byte) (int, error) {
	if room := c.max - c.Len(); room > 0 {
		c.Buffer.Write(b[:min(len(b), room)])
	}
	return len(b), nil
}
