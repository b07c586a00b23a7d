package main

import (
	"context"
	"fmt"
	"io"
	"os"
	"os/signal"
	"time"

	"tally/runtime/host"
	"tally/runtime/isolate"
	"tally/runtime/page"
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
	addr := f.fs.String("http", "", "serve a live page at `ADDR` (host:port; :0 picks a free port; loopback unless a host is named)")
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
	cfg := watch.Config{Host: f.config(stderr), Out: stdout, Run: run}
	if *addr != "" {
		l, err := page.Listen(*addr)
		if err != nil {
			fmt.Fprintf(stderr, "tally: %v\n", err)
			return 1
		}
		hub := page.NewHub()
		hub.Attach(&cfg)
		fmt.Fprintf(stdout, "page: %s (read-only)\n", page.URL(l))
		go page.Serve(ctx, l, hub)
	}
	err := watch.Run(ctx, f.fs.Args(), cfg)
	if err != nil {
		return exitCode(err, stderr)
	}
	return 0
}
