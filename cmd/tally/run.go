package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"os/signal"
	"path/filepath"
	"time"

	"tally/runtime/host"
	"tally/runtime/longrun"
	"tally/runtime/output"
	"tally/runtime/page"
	"tally/runtime/result"
	"tally/runtime/sim"
)

func init() {
	register(command{name: "run", args: "[flags] FILE.go", help: "run an experiment in the embedded interpreter", run: runCmd})
}

// runFlags are the flags every way of running a script shares.
type runFlags struct {
	fs      *flag.FlagSet
	workers int
	seed    uint64
	quiet   bool
	trust   bool
	// long-run flags (-resume, -restart, -checkpoint, -shard, -extend): see longrun.Flags.
	longFlags func() (*longrun.Settings, error)
	long      *longrun.Settings
}

func newRunFlags(name, args string, stderr io.Writer) *runFlags {
	f := &runFlags{fs: flag.NewFlagSet("tally "+name, flag.ContinueOnError)}
	f.fs.SetOutput(stderr)
	f.fs.IntVar(&f.workers, "workers", 0, "parallel workers (0: all cores)")
	f.fs.Uint64Var(&f.seed, "seed", sim.DefaultSeed, "random seed (overrides the script's)")
	f.fs.BoolVar(&f.quiet, "quiet", false, "no progress output")
	f.fs.BoolVar(&f.trust, "trust", false, "lift the sandbox: let the script import any standard package (os, net, …)")
	f.longFlags = longrun.Flags(f.fs)
	f.fs.Usage = func() {
		fmt.Fprintf(stderr, "usage: tally %s [flags] %s\n\nflags:\n", name, args)
		f.fs.PrintDefaults()
	}
	return f
}

func (f *runFlags) config(stderr io.Writer) host.Config {
	c := host.Config{Workers: f.workers, Seed: f.seed, Quiet: f.quiet, Trust: f.trust, Log: stderr, Long: f.long}
	f.fs.Visit(func(fl *flag.Flag) {
		if fl.Name == "seed" {
			c.SeedSet = true
		}
	})
	return c
}

// parse returns the exit code for -h (0) or bad flags (2), or -1 to go on.
func (f *runFlags) parse(args []string) int {
	if err := f.fs.Parse(args); err != nil {
		if errors.Is(err, flag.ErrHelp) {
			return 0
		}
		return 2
	}
	var err error
	if f.long, err = f.longFlags(); err != nil {
		fmt.Fprintf(f.fs.Output(), "tally: %v\n", err)
		return 2
	}
	return -1
}

func runCmd(args []string, stdout, stderr io.Writer) int {
	f := newRunFlags("run", "FILE.go", stderr)
	html := f.fs.Bool("html", false, "also write index.html, the results page as one file to open or send")
	if code := f.parse(args); code >= 0 {
		return code
	}
	if f.fs.NArg() != 1 {
		f.fs.Usage()
		return 2
	}
	ctx, stopSignals := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stopSignals()
	cfg := f.config(stderr)
	var last *result.Run
	if *html {
		cfg.Done = func(r *result.Run) error { last = r; return nil }
	}
	if err := host.Run(ctx, f.fs.Arg(0), cfg); err != nil {
		return exitCode(err, stderr)
	}
	if last != nil && (f.long == nil || f.long.Shard == nil) {
		if err := writeSnapshot(f.fs.Arg(0), last); err != nil {
			fmt.Fprintf(stderr, "tally: %v\n", err)
			return 1
		}
	}
	return 0
}

// writeSnapshot writes the results page of a finished run beside its other outputs.
func writeSnapshot(script string, r *result.Run) error {
	b, err := page.Snapshot([]*result.Run{r}, []string{filepath.Base(script)}, time.Now())
	if err != nil {
		return fmt.Errorf("index.html: %w", err)
	}
	return output.Atomic(filepath.Join(sim.OutputDir(script), "index.html"), b)
}

// exitCode reports a run's error and gives the exit code: 1 for a script or run error, 130 for
// an interrupted run.
func exitCode(err error, stderr io.Writer) int {
	switch {
	case err == nil:
		return 0
	case errors.Is(err, sim.ErrInterrupted):
		fmt.Fprintln(stderr, "interrupted: finished points written")
		return 130
	default:
		fmt.Fprintln(stderr, err)
		return 1
	}
}
