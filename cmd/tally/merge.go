package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"os/signal"

	"tally/runtime/host"
	"tally/runtime/isolate"
	"tally/runtime/longrun"
	"tally/runtime/output"
)

func init() {
	register(command{name: "merge", args: "[flags] SHARDS...", help: "combine shard results into one run's outputs", run: mergeCmd})
}

// exitShort is merge's exit code when the shards do not yet cover every point.
const exitShort = 3

// mergeCmd replays the shards' frames, in order, through the script's stop rules and writes the
// outputs a single run would have written. When the shards fall short it names the points,
// leaves a plan for `tally run -shard i/N -extend` and exits 3.
func mergeCmd(args []string, stdout, stderr io.Writer) int {
	fs := flag.NewFlagSet("tally merge", flag.ContinueOnError)
	fs.SetOutput(stderr)
	script := fs.String("script", "", "the experiment `FILE.go` (default: the script the shard files name)")
	quiet := fs.Bool("quiet", false, "no progress output")
	trust := fs.Bool("trust", false, "lift the sandbox, as for tally run")
	fs.Usage = func() {
		fmt.Fprintf(stderr, "usage: tally merge [flags] SHARDS...\n\n"+
			"SHARDS are shard files or folders holding them (an outputs folder, or its shards/).\n"+
			"Exit code 3: the shards do not cover every point far enough; run the shards again\n"+
			"with -extend and merge once more.\n\nflags:\n")
		fs.PrintDefaults()
	}
	if err := fs.Parse(args); err != nil {
		if errors.Is(err, flag.ErrHelp) {
			return 0
		}
		return 2
	}
	if fs.NArg() == 0 {
		fs.Usage()
		return 2
	}
	m, err := longrun.Gather(fs.Args())
	if err != nil {
		complain(stderr, "merge", err)
		return 1
	}
	path, err := longrun.FindScript(*script, m)
	if err != nil {
		complain(stderr, "merge", err)
		return 1
	}
	set := &longrun.Settings{Replay: m}
	cfg := host.Config{Workers: 1, Seed: m.Seed, SeedSet: true, Quiet: *quiet, Trust: *trust, Log: stderr, Long: set}
	release, err := isolate.Lock(output.Dir(path), ".lock")
	if err != nil {
		fmt.Fprintln(stderr, "tally merge:", err)
		return 1
	}
	defer release()
	ctx, stopSignals := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stopSignals()
	err = host.Run(ctx, path, cfg)
	dir := output.Dir(path)
	if set.Short != nil {
		complain(stderr, "merge", set.Short)
		pp, err := longrun.SavePlan(dir, m, set.Short)
		if err != nil {
			complain(stderr, "merge", err)
			return 1
		}
		fmt.Fprintf(stderr, "nothing written. Run every shard again with -extend (it reads %s):\n"+
			"  tally run -shard i/%d -extend %s\nthen merge again.\n", pp, m.Of, path)
		return exitShort
	}
	if err != nil {
		return exitCode(err, stderr)
	}
	if err := longrun.RemovePlan(dir); err != nil {
		complain(stderr, "merge", err)
	}
	if !*quiet {
		fmt.Fprintf(stderr, "merged %d shards into %s\n", m.Of, dir)
		if r := set.Record; r != nil && r.Used > 0 {
			fmt.Fprintf(stderr, "the shards computed %d bits, one machine %d: %.0f %% more (run.json: shards)\n", r.Bits, r.Used, 100*r.Overshoot)
		}
	}
	return 0
}
