package bench

import (
	"bytes"
	"context"
	_ "embed"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"sync"
	"time"

	"tally/blocks/link"
	"tally/blocks/stop"
	"tally/runtime/engine"
	"tally/runtime/host"
	"tally/runtime/result"
	"tally/runtime/sim"
)

// Script is the embedded experiment script that builds the standard links (script.go).
//
//go:embed script.go
var Script []byte

// Seed is the seed of every path (the script's default, sim.DefaultSeed).
const Seed = sim.DefaultSeed

// Result is what one path counted on one case, and how long it took.
type Result struct {
	Case    string
	Path    string // "script", "compiled" or "reference"
	Workers int
	Bits    int64
	Errors  int64
	Wall    time.Duration // the engine's time for the point (script, compiled) or the loop's
	CPU     time.Duration // the process's CPU time over the same span (0: not measured)
}

// Time is the CPU time when measured, else the wall time.
func (r Result) Time() time.Duration {
	if r.CPU > 0 {
		return r.CPU
	}
	return r.Wall
}

// Rate is the throughput in Mbit/s over Time: per CPU second when the CPU time is measured.
func (r Result) Rate() float64 { return float64(r.Bits) / r.Time().Seconds() / 1e6 }

// WallRate is the throughput in Mbit/s over the wall time.
func (r Result) WallRate() float64 { return float64(r.Bits) / r.Wall.Seconds() / 1e6 }

// BER is the measured bit error rate.
func (r Result) BER() float64 { return float64(r.Errors) / float64(r.Bits) }

// Compiled runs the case's link for bits bits on the engine, straight from compiled code.
func Compiled(ctx context.Context, c Case, bits int64, workers int) (Result, error) {
	spec := engine.Spec{Point: c.Point, Seed: Seed, Workers: workers,
		Build: func() (*link.Link, error) { return c.Link(), nil },
		Rules: []stop.Rule{stop.Bits(float64(bits))}}
	c0, ok := cpuTime()
	out, err := engine.Run(ctx, spec)
	c1, _ := cpuTime()
	if err != nil {
		return Result{}, fmt.Errorf("%s compiled: %w", c.Name, err)
	}
	if out.Stop != "bits" {
		return Result{}, fmt.Errorf("%s compiled: stopped by %q", c.Name, out.Stop)
	}
	r := Result{Case: c.Name, Path: "compiled", Workers: workers, Bits: out.Counts[0].Trials,
		Errors: out.Counts[0].Errors, Wall: out.Elapsed}
	if ok {
		r.CPU = c1 - c0
	}
	return r, nil
}

// Reference runs the case's reference loop for bits bits on the calling goroutine.
func Reference(c Case, bits int64) Result {
	es := math.Pow(10, c.EbN0/10) * float64(c.Modem().Bits) // Es/N0 with Es = 1
	sigma := math.Sqrt(1 / es / 2)
	c0, ok := cpuTime()
	t := time.Now()
	e := c.ref(bits, sigma, Seed)
	r := Result{Case: c.Name, Path: "reference", Workers: 1, Bits: bits, Errors: e, Wall: time.Since(t)}
	if c1, _ := cpuTime(); ok {
		r.CPU = c1 - c0
	}
	return r
}

var bitsLine = regexp.MustCompile(`(?m)^const bits = .*$`)

// ScriptSource is the embedded script with its bit count set to bits.
func ScriptSource(bits int64) []byte {
	return bitsLine.ReplaceAll(Script, []byte("const bits = "+strconv.FormatInt(bits, 10)))
}

// clock notes the process's CPU time when the script says it starts its links and when the
// run reports each finished point ("link=<case> …" in its log), so a point's CPU time is the
// span between its line and the one before.
type clock struct {
	mu    sync.Mutex
	start time.Duration
	ok    bool
	at    map[string]time.Duration // by case name
	order []string
}

func (c *clock) stdout() io.Writer {
	return writerFunc(func(p []byte) {
		if bytes.Contains(p, []byte("running the links")) {
			c.mu.Lock()
			c.start, c.ok = cpuTime()
			c.mu.Unlock()
		}
	})
}

func (c *clock) log() io.Writer {
	return writerFunc(func(p []byte) {
		rest, found := bytes.CutPrefix(p, []byte("link="))
		if !found {
			return
		}
		name, _, _ := bytes.Cut(rest, []byte(" "))
		t, _ := cpuTime()
		c.mu.Lock()
		c.at[string(name)] = t
		c.order = append(c.order, string(name))
		c.mu.Unlock()
	})
}

// spent is the CPU time of the named point, 0 if unknown.
func (c *clock) spent(name string) time.Duration {
	if !c.ok {
		return 0
	}
	prev := c.start
	for _, n := range c.order {
		if n == name {
			return c.at[n] - prev
		}
		prev = c.at[n]
	}
	return 0
}

type writerFunc func(p []byte)

func (f writerFunc) Write(p []byte) (int, error) { f(p); return len(p), nil }

// ScriptRun runs the embedded script in the interpreter host, as tally run does, in a
// temporary folder (its outputs are written there and removed), and returns its points in the
// order of Cases, with the wall time of the whole script run (interpreting it and writing the
// outputs included).
func ScriptRun(ctx context.Context, bits int64, workers int) ([]Result, time.Duration, error) {
	dir, err := os.MkdirTemp("", "tally-bench-")
	if err != nil {
		return nil, 0, err
	}
	defer os.RemoveAll(dir)
	path := filepath.Join(dir, "bench.go")
	if err := os.WriteFile(path, ScriptSource(bits), 0o644); err != nil {
		return nil, 0, err
	}
	var run *result.Run
	clk := &clock{at: map[string]time.Duration{}}
	cfg := host.Config{Workers: workers, Log: clk.log(), Stdout: clk.stdout(),
		Done: func(r *result.Run) error { run = r; return nil }}
	t := time.Now()
	if err := host.Run(ctx, path, cfg); err != nil {
		return nil, 0, fmt.Errorf("script: %w", err)
	}
	wall := time.Since(t)
	if run == nil || len(run.Points) != len(Cases) {
		return nil, 0, fmt.Errorf("script: expected %d points", len(Cases))
	}
	out := make([]Result, len(Cases))
	for i, c := range Cases {
		p := run.Points[c.Point]
		if p.Stop != "bits" {
			return nil, 0, fmt.Errorf("script: point %s stopped by %q", c.Name, p.Stop)
		}
		out[i] = Result{Case: c.Name, Path: "script", Workers: run.Workers, Bits: p.Taps[0].Trials,
			Errors: p.Taps[0].Errors, Wall: time.Duration(p.Seconds * float64(time.Second)), CPU: clk.spent(c.Name)}
	}
	return out, wall, nil
}
