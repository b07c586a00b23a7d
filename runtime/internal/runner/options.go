package runner

import (
	"context"
	"flag"
	"fmt"
	"io"
	"os"
	"os/signal"
	"runtime"

	"tally/blocks/stop"
	"tally/runtime/internal/wire"
	"tally/runtime/longrun"
	"tally/runtime/progress"
	"tally/runtime/result"
)

// DefaultSeed is the seed of a run that names none; it is recorded in every run record.
const DefaultSeed = 1

// Options are what the command line or the interpreter host tells a run: how it runs and where
// its outputs go. No script can name them.
type Options struct {
	Context context.Context
	Script  string // path of the script file
	Source  []byte // the script's bytes (hashed into the run record)
	Mode    string // "interpreted" or "compiled"
	Workers int    // 0: all cores
	Seed    uint64
	SeedSet bool      // Seed given on the command line (overrides the script's)
	Quiet   bool      // no progress output
	Log     io.Writer // progress and summaries (default stderr)
	// Done receives the finished run before its files are written; an error from it fails the run.
	Done func(r *result.Run) error
	// OnPoint, if set, is told of each point as it is committed: run is the run so far (its
	// header, and its points up to the new one, the last), total the number of points in the
	// sweep. run is still being filled: read it during the call, keep nothing of it.
	OnPoint func(run *result.Run, total int)
	// OnProgress, if set, receives the running point's committed prefix every progress.Every,
	// whether or not a live line is shown; pr is reused: read it during the call.
	OnProgress func(p progress.Point, pr *stop.Progress)
	// Where, set by the host, names the script statement being run ("file:line:col"), so a
	// mistake found during Run can point at the script.
	Where func() string
	// Long are the checkpoint, resume, shard and merge settings; nil keeps no checkpoint.
	Long *longrun.Settings
	// Reuse lets a point whose link fingerprint matches one of the last good run beside the
	// script (its run.json and frames.gz) replay that run's per-frame counts instead of
	// computing them, going on computing where its rules ask for more frames (tally watch).
	Reuse bool
	// Point, if set, is given the run so far after each point ends (finished points only).
	Point func(r *result.Run)
	// Output, if set, writes a finished run's files into dir instead of output.Write (the
	// isolated child hands them to its parent).
	Output func(dir string, r *result.Run) error
	// HandAt and Handover, if both set: the run calls Handover once point HandAt.Point has
	// committed HandAt.Frame frames (0: before its first), to hand the run over there (tests);
	// Handover cancels Context with ErrHandover.
	HandAt   *wire.Spot
	Handover func()
	// Reported is the number of points the run this one continues (a hand-over) has reported
	// already: their lines are not printed again.
	Reported int

	ran string // the name of the experiment this script has run; a script runs one
}

// compiled are the options of a compiled run, read from its command line once.
var compiled *Options

// CommandLine reads the options of a compiled run (go run file.go [flags]) from its command
// line, once; it must be called by sim.New, called by the script.
func CommandLine() *Options {
	if compiled != nil {
		return compiled
	}
	if o, ok := childOptions(); ok {
		// Started by tally to continue a run (runtime/isolate): the job is its command line.
		if _, file, _, ok := runtime.Caller(2); ok {
			scriptFile = file
		}
		compiled = o
		return o
	}
	o := &Options{Mode: "compiled", Seed: DefaultSeed}
	fs := flag.NewFlagSet("experiment", flag.ContinueOnError)
	fs.IntVar(&o.Workers, "workers", 0, "parallel workers (0: all cores)")
	seed := fs.Uint64("seed", DefaultSeed, "random seed")
	fs.BoolVar(&o.Quiet, "quiet", false, "no progress output")
	long := longrun.Flags(fs)
	if err := fs.Parse(os.Args[1:]); err != nil {
		if err == flag.ErrHelp {
			os.Exit(0)
		}
		os.Exit(2)
	}
	fs.Visit(func(f *flag.Flag) {
		if f.Name == "seed" {
			o.Seed, o.SeedSet = *seed, true
		}
	})
	var err error
	if o.Long, err = long(); err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(2)
	}
	if _, file, _, ok := runtime.Caller(2); ok {
		scriptFile = file
		o.Script = file
		o.Source, _ = os.ReadFile(file)
	}
	ctx, _ := signal.NotifyContext(context.Background(), os.Interrupt)
	o.Context = ctx
	compiled = o
	return o
}

func (o *Options) log() io.Writer {
	if o.Log != nil {
		return o.Log
	}
	return os.Stderr
}

func (o *Options) logf(format string, a ...any) {
	if !o.Quiet {
		fmt.Fprintf(o.log(), format, a...)
	}
}
