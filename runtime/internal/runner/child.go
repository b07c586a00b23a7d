package runner

import (
	"context"
	"errors"
	"fmt"
	"os"

	"tally/blocks/stop"
	"tally/runtime/internal/wire"
	"tally/runtime/progress"
	"tally/runtime/result"
)

// A compiled script started by tally as a run's process (runtime/isolate hands an interpreted
// run over to it) speaks the interpreter's process's protocol (runtime/internal/wire): it reads
// its job instead of a command line, continues the run from the checkpoint the interpreter
// left, reports points, progress and the finished run to tally, which writes the outputs, and
// ends its run with an end report. What its main prints before Run was printed by the
// interpreter already and is dropped.

// child is the compiled program's side of the pipes (nil: not started by tally).
var child *childPipes

type childPipes struct {
	*wire.Pipes
	stdout *os.File // the real standard output, from Run on
	shown  string   // the script's path as tally named it, for positions
}

// childOptions reads the job of a compiled run's process and makes its options; ok is false
// when this process was not started so.
func childOptions() (o *Options, ok bool) {
	if os.Getenv(wire.EnvChild) == "" {
		return nil, false
	}
	pipes, dec, logf, j, err := wire.Open()
	if err != nil {
		fmt.Fprintln(os.Stderr, "tally: compiled run:", err)
		os.Exit(2)
	}
	c := &childPipes{Pipes: pipes}
	adoptBuild(j.Build)
	ctx, cancel := context.WithCancel(context.Background())
	go func() {
		for {
			var r wire.Reply
			if err := dec.Decode(&r); err != nil {
				os.Exit(3) // the parent is gone: nothing may outlive it
			}
			if r.Stop {
				cancel()
				continue
			}
			c.Answers <- r
		}
	}()
	c.stdout, c.shown = os.Stdout, j.Path
	if null, err := os.OpenFile(os.DevNull, os.O_WRONLY, 0); err == nil {
		os.Stdout = null
	}
	child = c
	o = &Options{Context: ctx, Script: j.Path, Source: j.Source, Mode: "compiled", Workers: j.Workers, Seed: j.Seed,
		SeedSet: j.SeedSet, Quiet: j.Quiet, Log: logf, Long: j.Settings(), Reported: j.Reported, Reuse: j.Reuse}
	o.OnPoint = func(r *result.Run, total int) {
		c.Send(wire.Report{Kind: wire.KindPoint, Run: wire.WithoutLogs(r), Total: total})
	}
	if j.Follow {
		o.OnProgress = func(p progress.Point, pr *stop.Progress) {
			c.Send(wire.Report{Kind: wire.KindLive, Live: wire.LiveOf(p, pr)})
		}
	}
	o.Done = func(r *result.Run) error {
		c.Send(wire.Report{Kind: wire.KindDone, Run: r})
		return c.Answer()
	}
	o.Output = func(dir string, _ *result.Run) error {
		c.Send(wire.Report{Kind: wire.KindWrite, Dir: dir})
		return c.Answer()
	}
	return o, true
}

// started gives the script its standard output back: from Run on, what it prints is new.
func (c *childPipes) started() {
	if c.stdout != nil {
		os.Stdout = c.stdout
	}
}

// end reports the end of the run: err nil (finished), ErrInterrupted, or a mistake.
func (c *childPipes) end(err error) {
	e := wire.Report{Kind: wire.KindEnd}
	var f *Failure
	switch {
	case err == nil:
	case errors.Is(err, ErrInterrupted):
		e.Interrupted = true
	case errors.As(err, &f):
		e.Script, e.Pos, e.Err = true, f.Pos, f.Err.Error()
	default:
		e.Err = err.Error()
	}
	c.Send(e)
}
