package bench

import (
	"bytes"
	"context"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strconv"
	"sync"
	"time"

	"tally/blocks/stop"
	"tally/runtime/compile"
	"tally/runtime/host"
	"tally/runtime/isolate"
	"tally/runtime/progress"
	"tally/runtime/result"
)

// CustomOptions are tally bench -custom's settings.
type CustomOptions struct {
	Bits    int64 // bits per point of the custom-block script
	Workers int   // workers (0: all cores)
	// Exe is the tally binary whose child processes run the script (default: this one, which
	// must serve them: see isolate.Child).
	Exe string

	warmCache string // the cache whose module folder both builds use (set by Custom)
}

// CustomResult is one way of running the custom-block script, from the command to its end.
type CustomResult struct {
	Path  string        // "interpreted", "handed over", "compiled", …
	Wall  time.Duration // the whole run: for compiled, go build plus running the program
	First time.Duration // from the start to the first progress report or point (0: not seen)
	Frame time.Duration // from the start to the first committed frame (0: not seen)
	Bits  int64         // bits counted over all points
	Table []byte        // its table.csv (the same bytes on every path)
	Note  string        // what else the path says (where it was handed over, the build's time)
}

// A CustomPath runs the custom-block script one way in the folder dir (the script is
// dir/custom.go). Paths are reported in Order.
type CustomPath struct {
	Name  string
	Order int
	Run   func(ctx context.Context, o CustomOptions, dir string) (CustomResult, error)
}

// CustomPaths are the ways tally bench -custom runs its case. Another file of this package may
// add one (a script variant, say) from its init.
var CustomPaths = []CustomPath{
	{Name: "interpreted", Order: 10, Run: func(ctx context.Context, o CustomOptions, dir string) (CustomResult, error) {
		return tallyRun(ctx, o, dir, nil)
	}},
	{Name: "handed over", Order: 30, Run: func(ctx context.Context, o CustomOptions, dir string) (CustomResult, error) {
		return tallyRun(ctx, o, dir, &isolate.Handover{Cache: o.warmCache})
	}},
	{Name: "compiled", Order: 40, Run: goBuildRun},
}

// Custom writes tally bench -custom's figures to w: the custom-block script run by tally run
// interpreted only, by tally run with its hand-over to the compiled script (the build included:
// the script is not in tally's binary cache; Go's own build cache is warm), and by a plain go
// build plus running the program, as a user would by hand; the wall time of each, its first
// progress (the first point told started) and first committed frame, and the ratio the
// hand-over's target is judged on (tally run ≤ 1.2 × go build plus running the program).
// Warm-up builds of other bytes first fill Go's build cache, for the hand-over's flags and a
// plain build's, in the module folder both use, as a user's second build finds it. Every path
// must write the same table.
func Custom(ctx context.Context, o CustomOptions, w io.Writer) error {
	if o.Bits < 4096 {
		return fmt.Errorf("bench: -custom-bits %d is less than one frame (4096 bits)", o.Bits)
	}
	paths := slices.Clone(CustomPaths)
	slices.SortStableFunc(paths, func(a, b CustomPath) int { return a.Order - b.Order })
	fmt.Fprintf(w, "custom block: two-branch combiner over Rayleigh fading, the script's own block written as a\n"+
		"per-sample loop and with the vector helpers (combiner_script.go): %d points of %d bits, %d workers\n"+
		"(0: all cores), wall clock from the command to its end\n", len(CombinerCases), o.Bits, o.Workers)
	// Both builds below then find tally's packages in Go's build cache, as a user's second
	// build does; what is measured is building the script and linking. The hand-over's build
	// and a plain go build use other flags, so each is warmed up.
	if dir, err := os.MkdirTemp("", "tally-bench-warm-"); err == nil {
		// Both builds go on in this cache's module folder (unpacked once, as for a user; a go
		// build without -trimpath finds its packages compiled only in the folder it compiled
		// them in); the script's bytes differ from the warm-up's, so neither finds it built.
		defer os.RemoveAll(dir)
		o.warmCache = dir
		t := time.Now()
		script := filepath.Join(dir, "custom.go")
		src := CombinerSource(o.Bits + 1)
		err := os.WriteFile(script, src, 0o644)
		if err == nil {
			_, err = compile.Script(ctx, compile.Request{Script: script, Source: src, Cache: dir, Tool: host.Version})
		}
		if err == nil {
			err = goBuild(ctx, script, filepath.Join(dir, "program"), dir)
		}
		if err != nil {
			return fmt.Errorf("bench: custom block: %w", err)
		}
		fmt.Fprintf(w, "warm-up builds %.1f s (fill Go's build cache with tally's packages)\n", time.Since(t).Seconds())
	}
	var rs []CustomResult
	for _, p := range paths {
		dir, err := os.MkdirTemp("", "tally-bench-custom-")
		if err != nil {
			return err
		}
		err = os.WriteFile(filepath.Join(dir, "custom.go"), CombinerSource(o.Bits), 0o644)
		var r CustomResult
		if err == nil {
			r, err = p.Run(ctx, o, dir)
		}
		os.RemoveAll(dir)
		if err != nil {
			return fmt.Errorf("bench: custom block, %s: %w", p.Name, err)
		}
		r.Path = p.Name
		if len(rs) > 0 && !bytes.Equal(r.Table, rs[0].Table) {
			return fmt.Errorf("bench: custom block: %s wrote another table than %s", r.Path, rs[0].Path)
		}
		rs = append(rs, r)
		ms := func(d time.Duration) string {
			if d == 0 {
				return "—"
			}
			return fmt.Sprintf("%.0f ms", d.Seconds()*1e3)
		}
		fmt.Fprintf(w, "%-12s wall=%-9s first progress=%-8s first frame=%-8s Mbit/s=%-8.3f %s\n", r.Path, progress.Duration(r.Wall),
			ms(r.First), ms(r.Frame), float64(r.Bits)/r.Wall.Seconds()/1e6, r.Note)
	}
	var hand, comp *CustomResult
	for i := range rs {
		switch rs[i].Path {
		case "handed over":
			hand = &rs[i]
		case "compiled":
			comp = &rs[i]
		}
	}
	if hand != nil && comp != nil {
		fmt.Fprintf(w, "ratio        handed over / (go build + run) = %.2f (target ≤ 1.2); the same table on every path\n", hand.Wall.Seconds()/comp.Wall.Seconds())
	}
	return nil
}

// tallyRun runs dir/custom.go as tally run does (a child process, the hand-over h or none).
func tallyRun(ctx context.Context, o CustomOptions, dir string, h *isolate.Handover) (CustomResult, error) {
	var once, onceFrame sync.Once
	var first, frame time.Duration
	var run *result.Run
	start := time.Now()
	seen := func() { once.Do(func() { first = time.Since(start) }) }
	framed := func() { onceFrame.Do(func() { frame = time.Since(start) }) }
	cfg := isolate.Config{Exe: o.Exe, Handover: h, Host: host.Config{Workers: o.Workers, Quiet: true, Log: io.Discard, Stdout: io.Discard,
		OnProgress: func(_ progress.Point, pr *stop.Progress) {
			seen()
			if pr.Frames > 0 {
				framed()
			}
		},
		OnPoint: func(*result.Run, int) { seen(); framed() },
		Done:    func(r *result.Run) error { run = r; return nil }}}
	if err := isolate.Run(ctx, filepath.Join(dir, "custom.go"), cfg); err != nil {
		return CustomResult{}, err
	}
	r := CustomResult{Wall: time.Since(start), First: first, Frame: frame}
	if run != nil {
		r.Bits = bitsOf(run)
		if e := run.Execution; e != nil && e.At != nil {
			r.Note = fmt.Sprintf("(handed over at point %d, frame %d; build %.1f s)", e.At.Point, e.At.Frame, e.BuildSeconds)
		} else if e != nil && e.Why != "" {
			r.Note = "(stayed interpreted: " + e.Why + ")"
		}
	}
	var err error
	r.Table, err = os.ReadFile(filepath.Join(dir, "custom", "table.csv"))
	return r, err
}

// goBuildRun builds dir/custom.go as a user would by hand, go build with no flags in the
// folder of tally's module the hand-over builds in too, and runs the program.
func goBuildRun(ctx context.Context, o CustomOptions, dir string) (CustomResult, error) {
	start := time.Now()
	prog := filepath.Join(dir, "program")
	if err := goBuild(ctx, filepath.Join(dir, "custom.go"), prog, o.warmCache); err != nil {
		return CustomResult{}, err
	}
	built := time.Since(start)
	cmd := exec.CommandContext(ctx, prog, "-quiet", "-workers", strconv.Itoa(o.Workers))
	cmd.Dir = dir
	var out bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &out
	if err := cmd.Run(); err != nil {
		return CustomResult{}, fmt.Errorf("%v: %s", err, out.String())
	}
	r := CustomResult{Wall: time.Since(start), Note: fmt.Sprintf("(go build %.1f s, run %.1f s)", built.Seconds(), (time.Since(start) - built).Seconds())}
	var err error
	r.Table, err = os.ReadFile(filepath.Join(dir, "custom", "table.csv"))
	r.Bits = o.Bits * int64(len(CombinerCases))
	return r, err
}

// goBuild runs go build -o prog script in tally's module (the checkout the script sits in,
// or the source snapshot unpacked into cache), with the user's environment.
func goBuild(ctx context.Context, script, prog, cache string) error {
	mod, err := compile.ModuleDir(script, cache)
	if err != nil {
		return err
	}
	cmd := exec.CommandContext(ctx, "go", "build", "-o", prog, script)
	cmd.Dir = mod
	var out bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &out
	if err := cmd.Run(); err != nil {
		return fmt.Errorf("go build: %v: %s", err, out.String())
	}
	return nil
}

// bitsOf is the bits a run counted over its points (the first tap, the BER's).
func bitsOf(r *result.Run) int64 {
	var n int64
	for _, p := range r.Points {
		if len(p.Taps) > 0 {
			n += p.Taps[0].Trials
		}
	}
	return n
}
