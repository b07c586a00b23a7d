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
	"runtime"
	"time"

	"tally/runtime/host"
	"tally/runtime/isolate"
	"tally/runtime/longrun"
	"tally/runtime/output"
	"tally/runtime/page"
	"tally/runtime/progress"
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
	memory  isolate.SizeFlag
	// interpreted keeps a run in the interpreter: no build, no hand-over to the compiled script.
	interpreted bool
	handover    isolate.Handover // the hand-overs' shared state (reasons said once)
	// long-run flags (-resume, -restart, -checkpoint, -shard, -extend): see longrun.Flags.
	longFlags func() (*longrun.Settings, error)
	long      *longrun.Settings
}

func newRunFlags(name, args string, stderr io.Writer) *runFlags {
	f := &runFlags{fs: flag.NewFlagSet("tally "+name, flag.ContinueOnError)}
	f.fs.SetOutput(stderr)
	f.fs.IntVar(&f.workers, "workers", 0, "parallel workers, 1 to 4 per core (0: all cores)")
	f.fs.Uint64Var(&f.seed, "seed", sim.DefaultSeed, "random seed (overrides the script's)")
	f.fs.BoolVar(&f.quiet, "quiet", false, "no progress output")
	f.fs.BoolVar(&f.trust, "trust", false, "lift the sandbox: let the script import any standard package (os, net, …); under watch, only the files there at the start")
	f.fs.BoolVar(&f.interpreted, "interpreted", false, "run in the interpreter only: no build with the Go toolchain and no hand-over to the compiled script")
	f.fs.Var(&f.memory, "memory", "the `size` of memory a run may use, such as 4GiB or 512MiB (default: half the machine's, "+isolate.Size(isolate.DefaultMemory())+" here); a run over it ends with an error")
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
	if max := 4 * runtime.NumCPU(); f.workers < 0 || f.workers > max {
		fmt.Fprintf(f.fs.Output(), "tally: -workers %d: give 1 to %d (4 per core), or 0 for all %d cores\n", f.workers, max, runtime.NumCPU())
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
	cfg := f.isolated(stderr)
	if *html && (f.long == nil || f.long.Shard == nil) {
		// The page of the run the parent received, written after its other outputs.
		cfg.Also = func(dir string, r *result.Run) error { return writeSnapshot(dir, f.fs.Arg(0), r) }
	}
	var run *result.Run
	done := cfg.Host.Done
	cfg.Host.Done = func(r *result.Run) error {
		run = r
		if done != nil {
			return done(r)
		}
		return nil
	}
	start := time.Now()
	err := isolate.Run(ctx, f.fs.Arg(0), cfg)
	if err == nil && run != nil && !f.quiet && (f.long == nil || f.long.Shard == nil) {
		ending(stderr, f.fs.Arg(0), run, time.Since(start))
	}
	return exitCode(err, stderr)
}

// isolated is how a run's child process is made.
func (f *runFlags) isolated(stderr io.Writer) isolate.Config {
	c := isolate.Config{Host: f.config(stderr), Memory: f.memory.Bytes}
	if !f.interpreted && os.Getenv(envInterpreted) == "" {
		c.Handover = &f.handover
	}
	return c
}

// envInterpreted, set to anything, keeps every run interpreted, as -interpreted does (a CI job,
// the tests of this command).
const envInterpreted = "TALLY_INTERPRETED"

// ending is the last word of a run: where the outputs went, and the crossings at the targets
// as README.md gives them.
func ending(w io.Writer, script string, r *result.Run, took time.Duration) {
	fmt.Fprintf(w, "%s: %d points in %s → %s%c\n", script, len(r.Points), progress.Duration(took), output.Dir(script), filepath.Separator)
	for _, l := range output.Crossings(r) {
		fmt.Fprintf(w, "  %s\n", l)
	}
}

// writeSnapshot writes the results page of a finished run into dir, beside its other outputs.
func writeSnapshot(dir, script string, r *result.Run) error {
	b, err := page.Snapshot([]*result.Run{r}, []string{filepath.Base(script)}, time.Now())
	if err != nil {
		return fmt.Errorf("index.html: %w", err)
	}
	return output.Atomic(filepath.Join(dir, "index.html"), b)
}

// exitCode reports a run's error and gives the exit code: 1 for a script or run error, 130 for
// an interrupted run.
func exitCode(err error, stderr io.Writer) int {
	switch {
	case err == nil:
		return 0
	case errors.Is(err, host.ErrInterrupted):
		var ie *isolate.Interrupted
		if errors.As(err, &ie) {
			fmt.Fprintln(stderr, ie)
		} else {
			fmt.Fprintln(stderr, "interrupted: finished points written")
		}
		return 130
	default:
		fmt.Fprintln(stderr, err)
		return 1
	}
}
