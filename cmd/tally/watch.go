package main

import (
	"context"
	"fmt"
	"io"
	"os"
	"os/signal"

	"tally/runtime/page"
	"tally/runtime/watch"
)

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
	cfg := watch.Config{Host: f.config(stderr), Out: stdout}
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
