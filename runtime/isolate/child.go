package isolate

import (
	"context"
	"errors"
	"fmt"
	"os"
	"time"

	"tally/blocks/stop"
	"tally/runtime/host"
	"tally/runtime/internal/runner"
	"tally/runtime/internal/wire"
	"tally/runtime/progress"
	"tally/runtime/result"
)

// envChild marks a process started as a child: its value is the protocol version.
const envChild = wire.EnvChild

const protocol = wire.Protocol

// MaxStack is the child's stack limit (wire.MaxStack).
const MaxStack = wire.MaxStack

// Child reports whether this process was started by Run as a child. Call it first thing in
// main (and in TestMain of a test that starts children from its own binary), then Serve.
func Child() bool { return os.Getenv(envChild) != "" }

// Serve is the child's side: it runs the job its parent sends and reports back. It returns the
// process's exit code.
func Serve() int {
	pipes, dec, logf, j, err := wire.Open()
	if err != nil {
		fmt.Fprintln(os.Stderr, "tally: child:", err)
		return 2
	}
	c := &child{pipes}
	ctx, cancel := context.WithCancelCause(context.Background())
	stop := func() { cancel(nil) }
	defer stop()
	go func() {
		for {
			var r reply
			if err := dec.Decode(&r); err != nil {
				os.Exit(3) // the parent is gone: nothing may outlive it
			}
			if r.Stop && r.Handover {
				// The engine stops at a commit boundary; no outputs.
				runner.RequestHandover(func() { cancel(runner.ErrHandover) })
				continue
			}
			if r.Stop {
				stop()
				continue
			}
			c.Answers <- r
		}
	}()

	cfg := config(j)
	cfg.Log = logf
	cfg.Stdout = os.Stdout
	cfg.OnPoint = func(r *result.Run, total int) {
		c.Send(report{Kind: kindPoint, Run: wire.WithoutLogs(r), Total: total})
	}
	if j.Follow {
		cfg.OnProgress = c.progress
	}
	cfg.Done = func(r *result.Run) error {
		c.Send(report{Kind: kindDone, Run: r})
		return c.Answer()
	}
	cfg.Output = func(dir string, _ *result.Run) error {
		c.Send(report{Kind: kindWrite, Dir: dir})
		return c.Answer()
	}
	cfg.Position = func(where func() string) { go c.samplePos(ctx, where) }
	if j.HandAt != nil {
		cfg.HandAt, cfg.Handover = j.HandAt, func() { cancel(runner.ErrHandover) }
	}
	err = host.Run(ctx, j.Path, cfg)
	end := report{Kind: kindEnd}
	var se *host.ScriptError
	switch {
	case err == nil:
	case errors.Is(err, host.ErrInterrupted):
		end.Interrupted = true
		end.Handover = errors.Is(context.Cause(ctx), runner.ErrHandover)
	case errors.As(err, &se):
		end.Script, end.Pos, end.Err = true, se.Pos, se.Msg
	default:
		end.Err = err.Error()
	}
	c.Send(end)
	c.Close()
	// Goroutines the script started end with the process.
	return 0
}

type child struct{ *wire.Pipes }

// progress sends the running point's prefix (the engine calls it every progress.Every).
func (c *child) progress(p progress.Point, pr *stop.Progress) {
	c.Send(report{Kind: kindLive, Live: liveOf(p, pr)})
}

// samplePos tells the parent where the script is, so a crash can be placed at a statement.
func (c *child) samplePos(ctx context.Context, where func() string) {
	// Every millisecond while the run starts, since a crash in its first frames comes soon;
	// every 10 ms after that.
	t := time.NewTicker(time.Millisecond)
	defer t.Stop()
	slow := time.After(2 * time.Second)
	last := ""
	for {
		if p := where(); p != last {
			last = p
			c.Send(report{Kind: kindPos, Pos: p})
		}
		select {
		case <-ctx.Done():
			return
		case <-slow:
			t.Reset(10 * time.Millisecond)
		case <-t.C:
		}
	}
}
