package main

import (
	"context"
	"io"
	"os"
	"os/signal"

	"tally/runtime/watch"
)

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
	err := watch.Run(ctx, f.fs.Args(), watch.Config{Host: f.config(stderr), Out: stdout})
	if err != nil {
		return exitCode(err, stderr)
	}
	return 0
}
