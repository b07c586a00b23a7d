package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"os/signal"

	"tally/runtime/bench"
)

func init() {
	register(command{name: "bench", args: "[-bits N] [-workers N] [-custom]", help: "measure the standard links' throughput", run: benchCmd})
}

func benchCmd(args []string, stdout, stderr io.Writer) int {
	fs := flag.NewFlagSet("tally bench", flag.ContinueOnError)
	fs.SetOutput(stderr)
	var o bench.Options
	bits := fs.Float64("bits", 2e7, "bits per link and path (1e8 may be typed as such)")
	fs.IntVar(&o.Workers, "workers", 0, "workers for the scaling lines (0: all cores)")
	fs.IntVar(&o.Rounds, "rounds", 7, "rounds per path, interleaved; the fastest counts")
	custom := fs.Bool("custom", false, "instead, run the custom-block case: a script's own per-sample block by tally run interpreted, handed over to the compiled script, and by go build plus the program")
	customBits := fs.Float64("custom-bits", 1e6, "with -custom: bits per point (2 points: the block as a loop and with the vector helpers)")
	fs.Usage = func() {
		fmt.Fprintf(stderr, "usage: tally bench [flags]\n\nRuns BPSK and Gray 16-QAM over AWGN (hard decisions) through an experiment script,\nthe same blocks compiled, and a plain reference loop, and reports Mbit/s and their ratios.\n\nflags:\n")
		fs.PrintDefaults()
	}
	if err := fs.Parse(args); err != nil {
		if errors.Is(err, flag.ErrHelp) {
			return 0
		}
		return 2
	}
	if fs.NArg() != 0 || !(*bits >= 0 && *bits < 1e18) {
		fs.Usage()
		return 2
	}
	o.Bits = int64(*bits)
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	if *custom {
		if err := bench.Custom(ctx, bench.CustomOptions{Bits: int64(*customBits), Workers: o.Workers}, stdout); err != nil {
			complain(stderr, "bench", err)
			return 1
		}
		return 0
	}
	if err := bench.Report(ctx, o, stdout); err != nil {
		complain(stderr, "bench", err)
		return 1
	}
	return 0
}
