package bench

import (
	"context"
	_ "embed"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"strconv"
	"time"

	"tally/blocks/stats"
	"tally/runtime/host"
	"tally/runtime/result"
)

// CombinerScript is the custom-block case of tally bench (combiner_script.go): a two-antenna
// maximum-ratio combiner over Rayleigh fading written by the script itself, once as a loop
// over the samples and once with the vector helpers of blocks/vec. Its points are named by
// CombinerCases, in that order; its bit count is the line "const bits = …" (CombinerSource).
//
//go:embed combiner_script.go
var CombinerScript []byte

// CombinerCases are the points of CombinerScript: the block as a per-sample loop, and with
// the vector helpers.
var CombinerCases = []string{"combiner-loop", "combiner-vector"}

// CombinerEbN0 is the average Eb/N0 per branch of CombinerScript, in dB.
const CombinerEbN0 = 10.0

// CombinerSource is CombinerScript with its bit count set to bits.
func CombinerSource(bits int64) []byte {
	return bitsLine.ReplaceAll(CombinerScript, []byte("const bits = "+strconv.FormatInt(bits, 10)))
}

// CombinerBits is the bit count of the custom-block case for a bench of bits bits per
// standard link: a twentieth, since its loop runs about a thousand times slower than the
// standard links, and at least one frame.
func CombinerBits(bits int64) int64 { return max(bits/20, FrameBits) }

// CombinerBER is the BER of BPSK with two-branch maximum-ratio combining over independent
// Rayleigh fading at an average Eb/N0 of db per branch,
//
//	Pb = ((1−μ)/2)² · (1 + 2·(1+μ)/2),  μ = √(γ/(1+γ)),
//
// (Proakis, Digital Communications, 4th ed., 2001, eq. 14.4-15 with L = 2).
func CombinerBER(db float64) float64 {
	g := math.Pow(10, db/10)
	mu := math.Sqrt(g / (1 + g))
	return (1 - mu) * (1 - mu) / 4 * (2 + mu)
}

// CombinerRun runs CombinerScript in the interpreter host, as tally run does, in a temporary
// folder, and returns its points in the order of CombinerCases.
func CombinerRun(ctx context.Context, bits int64, workers int) ([]Result, error) {
	dir, err := os.MkdirTemp("", "tally-bench-")
	if err != nil {
		return nil, err
	}
	defer os.RemoveAll(dir)
	path := filepath.Join(dir, "combiner.go")
	if err := os.WriteFile(path, CombinerSource(bits), 0o644); err != nil {
		return nil, err
	}
	var run *result.Run
	clk := &clock{at: map[string]time.Duration{}}
	cfg := host.Config{Workers: workers, Log: clk.log(), Stdout: clk.stdout(),
		Done: func(r *result.Run) error { run = r; return nil }}
	if err := host.Run(ctx, path, cfg); err != nil {
		return nil, fmt.Errorf("combiner script: %w", err)
	}
	if run == nil || len(run.Points) != len(CombinerCases) {
		return nil, fmt.Errorf("combiner script: expected %d points", len(CombinerCases))
	}
	out := make([]Result, len(CombinerCases))
	for i, name := range CombinerCases {
		p := run.Points[i]
		if p.Stop != "bits" {
			return nil, fmt.Errorf("combiner script: point %s stopped by %q", name, p.Stop)
		}
		out[i] = Result{Case: name, Path: "script", Workers: run.Workers, Bits: p.Taps[0].Trials,
			Errors: p.Taps[0].Errors, Wall: time.Duration(p.Seconds * float64(time.Second)), CPU: clk.spent(name)}
	}
	return out, nil
}

// combinerReport writes the custom-block lines of tally bench: the script's own combiner as a
// per-sample loop and with the vector helpers, both interpreted, one worker on one core, the
// fastest of o.Rounds rounds, each against the closed-form BER.
func combinerReport(ctx context.Context, o Options, w io.Writer) error {
	bits := CombinerBits(o.Bits)
	fmt.Fprintf(w, "\ncustom block in the script: two antennas, Rayleigh fading, maximum-ratio combining, BPSK at %g dB per branch;\n", CombinerEbN0)
	fmt.Fprintf(w, "interpreted, one worker on one core (GOMAXPROCS 1), %d bits per way, fastest of %d round%s:\n", bits, o.Rounds, plural(o.Rounds))
	procs := runtime.GOMAXPROCS(1)
	best := map[string]Result{}
	err := func() error {
		defer runtime.GOMAXPROCS(procs)
		for range o.Rounds {
			rs, err := CombinerRun(ctx, bits, 1)
			if err != nil {
				return err
			}
			for _, r := range rs {
				if err := keep(best, r); err != nil {
					return err
				}
			}
		}
		return nil
	}()
	if err != nil {
		return err
	}
	theory := CombinerBER(CombinerEbN0)
	for _, name := range CombinerCases {
		r := best[name+" script"]
		ci, err := stats.ClopperPearson(r.Errors, r.Bits, 0.99)
		if err != nil {
			return err
		}
		fmt.Fprintf(w, "%-15s %-9s Mbit/s=%-7.3f (wall %7.3f)  errors=%-6d bits=%-8d ber=%.3e  99%% CI %.3e…%.3e  theory %.3e\n",
			name, "script", r.Rate(), r.WallRate(), r.Errors, r.Bits, r.BER(), ci.Low, ci.High, theory)
	}
	l, v := best[CombinerCases[0]+" script"], best[CombinerCases[1]+" script"]
	fmt.Fprintf(w, "%-15s vector/loop=%.0f  (wall clock: %.0f)\n", "combiner", v.Rate()/l.Rate(), v.WallRate()/l.WallRate())
	return nil
}
