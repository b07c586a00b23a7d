package main

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"os/signal"
	"path/filepath"
	"sort"

	"tally/runtime/host"
	"tally/runtime/isolate"
	"tally/runtime/longrun"
	"tally/runtime/sim"
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
	paths, err := shardFiles(fs.Args())
	if err != nil {
		fmt.Fprintln(stderr, "tally merge:", err)
		return 1
	}
	files := make([]*longrun.ShardFile, len(paths))
	for i, p := range paths {
		if files[i], err = longrun.LoadShard(p); err != nil {
			fmt.Fprintln(stderr, "tally merge:", err)
			return 1
		}
	}
	m, err := longrun.Merge(paths, files)
	if err != nil {
		fmt.Fprintln(stderr, "tally merge:", err)
		return 1
	}
	path, err := findScript(*script, m)
	if err != nil {
		fmt.Fprintln(stderr, "tally merge:", err)
		return 1
	}
	set := &longrun.Settings{Replay: m}
	cfg := host.Config{Workers: 1, Seed: m.Seed, SeedSet: true, Quiet: *quiet, Trust: *trust, Log: stderr, Long: set}
	release, err := isolate.Lock(sim.OutputDir(path), ".lock")
	if err != nil {
		fmt.Fprintln(stderr, "tally merge:", err)
		return 1
	}
	defer release()
	ctx, stopSignals := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stopSignals()
	err = host.Run(ctx, path, cfg)
	dir := sim.OutputDir(path)
	if set.Short != nil {
		fmt.Fprintln(stderr, "tally merge:", set.Short)
		plan := &longrun.Plan{SHA256: m.SHA256, Seed: m.Seed, Of: m.Of, Points: set.Short.Points}
		for i, p := range plan.Points {
			if p.Need == 0 && p.Covered > 0 {
				plan.Points[i].Need = 2 * p.Covered // no estimate: double
			}
		}
		pp := longrun.PlanPath(dir)
		if err := longrun.Save(pp, longrun.KindPlan, plan); err != nil {
			fmt.Fprintln(stderr, "tally merge:", err)
			return 1
		}
		fmt.Fprintf(stderr, "nothing written. Run every shard again with -extend (it reads %s):\n"+
			"  tally run -shard i/%d -extend %s\nthen merge again.\n", pp, m.Of, path)
		return exitShort
	}
	if err != nil {
		return exitCode(err, stderr)
	}
	if err := os.Remove(longrun.PlanPath(dir)); err != nil && !errors.Is(err, os.ErrNotExist) {
		fmt.Fprintln(stderr, "tally merge:", err)
	}
	if !*quiet {
		fmt.Fprintf(stderr, "merged %d shards into %s\n", m.Of, dir)
	}
	return 0
}

// shardFiles lists the shard files among args: files as given, folders by their shard files
// (or those of their shards/ subfolder).
func shardFiles(args []string) ([]string, error) {
	var out []string
	for _, a := range args {
		st, err := os.Stat(a)
		if err != nil {
			return nil, err
		}
		if !st.IsDir() {
			out = append(out, a)
			continue
		}
		found, _ := filepath.Glob(filepath.Join(a, "shard-*-of-*.tally"))
		if len(found) == 0 {
			found, _ = filepath.Glob(filepath.Join(longrun.ShardDir(a), "shard-*-of-*.tally"))
		}
		if len(found) == 0 {
			return nil, fmt.Errorf("no shard files (shard-I-of-N.tally) in %s", a)
		}
		sort.Strings(found)
		out = append(out, found...)
	}
	return out, nil
}

// findScript is the script to replay the shards with: the one given, else the path the shards
// were run with, else the script beside their outputs folder. Its hash must be theirs.
func findScript(given string, m *longrun.Merged) (string, error) {
	candidates := []string{given}
	if given == "" {
		// dir/<name>/shards/shard-i-of-N.tally belongs to dir/<name>.go.
		beside := filepath.Dir(filepath.Dir(m.Paths[0])) + filepath.Ext(m.Script)
		candidates = []string{m.Script, beside}
	}
	var changed string
	for _, c := range candidates {
		src, err := os.ReadFile(c)
		if err != nil {
			continue
		}
		sum := sha256.Sum256(src)
		if hex.EncodeToString(sum[:]) == m.SHA256 {
			return c, nil
		}
		if changed == "" {
			changed = c
		}
	}
	if changed != "" {
		return "", fmt.Errorf("%s is not the script the shards ran (its SHA-256 differs from %.12s…): it changed since, or give the right one with -script", changed, m.SHA256)
	}
	if given != "" {
		return "", fmt.Errorf("cannot read the script %s", given)
	}
	return "", fmt.Errorf("cannot find the script the shards ran (%s); give it with -script FILE.go", m.Script)
}
