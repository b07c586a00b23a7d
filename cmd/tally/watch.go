package main

import (
	"context"
	"io"
	"os"
	"os/signal"
	"time"

	"tally/runtime/host"
	"tally/runtime/isolate"
	"tally/runtime/watch"
)

// watchGrace is how long the run a save replaces may take to stop before its process is
// killed: its outputs are dropped anyway, so only a short wait for a clean end.
const watchGrace = 500 * time.Millisecond

func init() {
	register(command{name: "watch", args: "[flags] PATH...", help: "re-run experiments (files or folders) on every save", run: watchCmd})
}

// watchCmd runs each experiment once, then again on every save, until Ctrl-C.
func watchCmd(args []string, stdout, stderr io.Writer) int {
	f := newRunFlags("watch", "PATH...", stderr)
	if code := f.parse(args); code >= 0 {
		return code
	}
	if f.fs.NArg() == 0 {
		f.fs.Usage()
		return 2
	}
	ctx, stopSignals := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stopSignals()
	iso := f.isolated(stderr)
	iso.Grace = watchGrace
	run := func(ctx context.Context, path string, cfg host.Config) error {
		c := iso
		c.Host = cfg
		return isolate.Run(ctx, path, c)
	}
	err := watch.Run(ctx, f.fs.Args(), watch.Config{Host: f.config(stderr), Out: stdout, Run: run})
	if err != nil {
		return exitCode(err, stderr)
	}
	return 0
}
