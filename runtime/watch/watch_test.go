package watch

import (
	"bytes"
	"context"
	"errors"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	"tally/runtime/host"
)

// script is a small experiment with the blocks written as link.Func (BPSK by hand over the
// compiled AWGN channel), so the test depends on no modem package.
func script(seed int, bits string) string {
	return strings.NewReplacer("SEED", strconv.Itoa(seed), "BITS", bits).Replace(`//go:build ignore

package main

import (
	"tally/blocks/channel"
	"tally/blocks/link"
	"tally/blocks/rng"
	"tally/blocks/stop"
	"tally/runtime/sim"
)

func main() {
	x := sim.New("watched link")
	x.Sweep("ebn0_db", 0, 3)
	x.Seed(SEED)
	x.Link(func(p sim.Point) *link.Link {
		var bits, hard []byte
		var sym []complex128
		src := link.Func("src", func(f *link.Frame, r *rng.Stream) {
			bits = link.GrowBytes(bits, 256)
			r.Bits(bits)
			f.Bits = bits
			f.Coded = bits
		})
		mod := link.Func("bpsk", func(f *link.Frame, r *rng.Stream) {
			sym = link.GrowComplex(sym, len(f.Coded))
			for i, b := range f.Coded {
				sym[i] = complex(1-2*float64(b), 0)
			}
			f.Samples = sym
			f.BitsPerSymbol = 1
			f.Real = true
			f.Symbols = len(sym)
		})
		dem := link.Func("slice", func(f *link.Frame, r *rng.Stream) {
			hard = link.GrowBytes(hard, len(f.Samples))
			for i, s := range f.Samples {
				hard[i] = 0
				if real(s) < 0 {
					hard[i] = 1
				}
			}
			f.Hard = hard
		})
		return link.Chain(src, mod, channel.AWGN(p.Get("ebn0_db")), dem)
	})
	x.Stop(stop.Bits(BITS))
	x.Run()
}
`)
}

// lockedBuffer is the watcher's output, read by the test while the watcher writes.
type lockedBuffer struct {
	mu sync.Mutex
	b  bytes.Buffer
}

func (l *lockedBuffer) Write(p []byte) (int, error) {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.b.Write(p)
}

func (l *lockedBuffer) String() string {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.b.String()
}

type seen struct {
	Event
	tableThere bool // table.csv existed beside the script when the event was emitted
}

type harness struct {
	t      *testing.T
	events chan seen
	out    *lockedBuffer
	cancel context.CancelFunc
	ended  chan error
	all    []seen
}

// start watches paths in the background; the watch ends with the test.
func start(t *testing.T, paths ...string) *harness { return startWith(t, nil, paths...) }

// startWith is start with the configuration changed by mod.
func startWith(t *testing.T, mod func(*Config), paths ...string) *harness {
	h := &harness{t: t, events: make(chan seen, 1000), out: &lockedBuffer{}, ended: make(chan error, 1)}
	ctx, cancel := context.WithCancel(context.Background())
	h.cancel = cancel
	cfg := Config{Host: host.Config{Quiet: true}, Out: h.out, OnEvent: func(e Event) {
		_, err := os.Stat(filepath.Join(strings.TrimSuffix(e.File, ".go"), "table.csv"))
		h.events <- seen{Event: e, tableThere: err == nil}
	}}
	if mod != nil {
		mod(&cfg)
	}
	go func() { h.ended <- Run(ctx, paths, cfg) }()
	t.Cleanup(func() { h.stop() })
	return h
}

// wait takes events until one of kind for file comes, failing after a generous timeout (a
// loaded two-core machine runs the interpreter slowly).
func (h *harness) wait(kind Kind, file string) seen {
	h.t.Helper()
	deadline := time.After(90 * time.Second)
	for {
		select {
		case e := <-h.events:
			h.all = append(h.all, e)
			if e.Kind == kind && e.File == file {
				return e
			}
			if e.Kind == Failed && kind != Failed {
				h.t.Logf("unexpected failure of %s: %v", e.File, e.Err)
			}
		case <-deadline:
			h.t.Fatalf("no event %d for %s in time; output so far:\n%s", kind, file, h.out.String())
		}
	}
}

func (h *harness) stop() {
	if h.cancel == nil {
		return
	}
	h.cancel()
	h.cancel = nil
	select {
	case err := <-h.ended:
		if err != nil {
			h.t.Errorf("watch ended with %v", err)
		}
	case <-time.After(30 * time.Second):
		h.t.Error("watch did not end after its context was cancelled")
	}
}

func write(t *testing.T, path, content string) {
	t.Helper()
	if err := os.WriteFile(path, []byte(content), 0o644); err != nil {
		t.Fatal(err)
	}
}

func read(t *testing.T, path string) string {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

// First run, re-run on modify, a rename-style save, a broken save (error printed, outputs
// kept, watcher alive), recovery, a save that changes nothing, and a new experiment in the
// folder that is then deleted; an ordinary Go file beside them is never run.
func TestWatchEndToEnd(t *testing.T) {
	dir := t.TempDir()
	exp := filepath.Join(dir, "exp.go")
	table := filepath.Join(dir, "exp", "table.csv")
	write(t, exp, script(1, "2048"))
	write(t, filepath.Join(dir, "helper.go"), "package main\n\nfunc helper() {}\n")
	h := start(t, dir)

	e := h.wait(Finished, exp)
	if e.Run.Seed != 1 || len(e.Run.Points) != 2 {
		t.Fatalf("first run: seed %d, %d points", e.Run.Seed, len(e.Run.Points))
	}
	first := read(t, table)

	write(t, exp, script(2, "2048"))
	if e = h.wait(Finished, exp); e.Run.Seed != 2 {
		t.Fatalf("re-run on modify has seed %d", e.Run.Seed)
	}
	second := read(t, table)
	if second == first {
		t.Error("table.csv did not change with the seed")
	}
	if !strings.Contains(h.out.String(), "since the last run:") {
		t.Errorf("no comparison with the last run:\n%s", h.out.String())
	}

	// An editor's save: the new text goes to a temporary file renamed over the script.
	tmp := filepath.Join(dir, ".exp.go.tmp")
	write(t, tmp, script(3, "2048"))
	if err := os.Rename(tmp, exp); err != nil {
		t.Fatal(err)
	}
	if e = h.wait(Finished, exp); e.Run.Seed != 3 {
		t.Fatalf("rename-style save ran seed %d", e.Run.Seed)
	}
	third := read(t, table)

	broken := strings.Replace(script(4, "2048"), "x.Run()", "x.Run(", 1)
	write(t, exp, broken)
	e = h.wait(Failed, exp)
	var se *host.ScriptError
	if !errors.As(e.Err, &se) || !regexp.MustCompile(`exp\.go:\d+:\d+$`).MatchString(se.Pos) {
		t.Errorf("broken save: error %v, want file:line:col", e.Err)
	}
	if !strings.Contains(h.out.String(), se.Error()) {
		t.Errorf("the error is not printed:\n%s", h.out.String())
	}
	if got := read(t, table); got != third {
		t.Error("a failed run replaced the last good table")
	}

	write(t, exp, script(4, "2048"))
	if e = h.wait(Finished, exp); e.Run.Seed != 4 {
		t.Fatalf("recovery ran seed %d", e.Run.Seed)
	}
	write(t, exp, script(4, "2048"))
	h.wait(Unchanged, exp)

	other := filepath.Join(dir, "other.go")
	write(t, other, script(5, "1024"))
	h.wait(Added, other)
	h.wait(Finished, other)
	if _, err := os.Stat(filepath.Join(dir, "other", "table.csv")); err != nil {
		t.Errorf("new experiment wrote no table: %v", err)
	}
	if err := os.Remove(other); err != nil {
		t.Fatal(err)
	}
	h.wait(Forgotten, other)

	h.stop()
	for _, e := range h.all {
		if strings.HasSuffix(e.File, "helper.go") {
			t.Errorf("an ordinary Go file was taken for an experiment: %+v", e.Event)
		}
	}
}

// A save during a run cancels it at once; the cancelled run writes nothing and the new run's
// outputs follow.
func TestWatchCancelsRunInFlight(t *testing.T) {
	dir := t.TempDir()
	exp := filepath.Join(dir, "long.go")
	write(t, exp, script(1, "1e12")) // would run for days
	h := start(t, exp)
	h.wait(Started, exp)
	write(t, exp, script(1, "1024"))
	c := h.wait(Cancelled, exp)
	if c.tableThere {
		t.Error("the cancelled run wrote its outputs")
	}
	e := h.wait(Finished, exp)
	if bits := e.Run.Points[0].Taps[0].Trials; bits != 1024 {
		t.Errorf("the run after the save counted %d bits, want 1024", bits)
	}
	if !e.tableThere {
		t.Error("the new run wrote no table")
	}
}

// trustingScript needs the sandbox lifted: it imports os.
func trustingScript() string {
	return strings.Replace(strings.Replace(script(1, "1024"), "import (", "import (\n\t\"os\"", 1),
		"x.Run()", "x.Run()\n\t_ = os.Getpid", 1)
}

// watch -trust trusts the files there at the start only: a file dropped into the watched
// folder later runs sandboxed, so its import of os is refused. Before, it ran trusted.
func TestWatchTrustsOnlyFilesAtStart(t *testing.T) {
	dir := t.TempDir()
	named := filepath.Join(dir, "named.go")
	write(t, named, trustingScript())
	h := startWith(t, func(c *Config) { c.Host.Trust = true }, dir)
	h.wait(Finished, named)
	dropped := filepath.Join(dir, "dropped.go")
	write(t, dropped, trustingScript())
	e := h.wait(Failed, dropped)
	if e.Err == nil || !strings.Contains(e.Err.Error(), `import "os" is not allowed in a sandboxed script`) {
		t.Errorf("a file dropped in later: %v, want the sandbox to refuse its import of os", e.Err)
	}
	if !strings.Contains(h.out.String(), "run sandboxed") {
		t.Errorf("the watcher did not say the new file runs sandboxed:\n%s", h.out.String())
	}
}

// A watched folder moved away and made again is watched again: a save in the new folder runs.
// Before, the watch stayed on the moved folder and the new one was never seen.
func TestWatchFolderReplaced(t *testing.T) {
	old := folderPoll
	folderPoll = 20 * time.Millisecond
	t.Cleanup(func() { folderPoll = old })
	root := t.TempDir()
	dir := filepath.Join(root, "exps")
	os.Mkdir(dir, 0o755)
	exp := filepath.Join(dir, "exp.go")
	write(t, exp, script(1, "1024"))
	h := start(t, dir)
	h.wait(Finished, exp)
	if err := os.Rename(dir, filepath.Join(root, "moved")); err != nil {
		t.Fatal(err)
	}
	for deadline := time.Now().Add(30 * time.Second); !strings.Contains(h.out.String(), "the folder is gone"); time.Sleep(10 * time.Millisecond) {
		if time.Now().After(deadline) {
			t.Fatalf("the watcher did not notice its folder moved away:\n%s", h.out.String())
		}
	}
	os.Mkdir(dir, 0o755)
	write(t, exp, script(2, "1024"))
	if e := h.wait(Finished, exp); e.Run.Seed != 2 {
		t.Errorf("the run in the new folder has seed %d, want 2", e.Run.Seed)
	}
	write(t, exp, script(3, "1024"))
	if e := h.wait(Finished, exp); e.Run.Seed != 3 {
		t.Errorf("a save in the new folder ran seed %d, want 3", e.Run.Seed)
	}
}

func TestWatchBadPath(t *testing.T) {
	err := Run(context.Background(), []string{filepath.Join(t.TempDir(), "missing.go")}, Config{Out: &lockedBuffer{}})
	if err == nil {
		t.Error("watching a missing path is no error")
	}
	if err := Run(context.Background(), nil, Config{}); err == nil {
		t.Error("watching nothing is no error")
	}
}

func TestIsExperiment(t *testing.T) {
	for src, want := range map[string]bool{
		"//go:build ignore\n\npackage main\n":               true,
		"// A note.\n\n//go:build ignore\n\npackage main\n": true,
		"// +build ignore\n\npackage main\n":                true,
		"package main\n\n//go:build ignore\n":               false,
		"//go:build linux\n\npackage main\n":                false,
		"//go:build !linux\n\npackage main\n":               false,
		"package main\n":                                    false,
	} {
		if got := isExperiment([]byte(src)); got != want {
			t.Errorf("isExperiment(%q) = %v", src, got)
		}
	}
	for p, want := range map[string]bool{"a/x.go": true, "a/x_test.go": false, "a/.x.go": false, "a/x.go~": false, "a/x.go.swp": false, "a/x": false} {
		if got := candidate(p); got != want {
			t.Errorf("candidate(%q) = %v", p, got)
		}
	}
}

// BenchmarkSaveToFirstFrame measures a save to the first point's line in the log (the first
// feedback a person sees) for a one-point, one-frame script: debounce, file read, interpreter
// load and the frame. Goal: under 100 ms on one core.
func BenchmarkSaveToFirstFrame(b *testing.B) {
	dir := b.TempDir()
	exp := filepath.Join(dir, "tiny.go")
	tiny := func(seed int) string {
		return strings.Replace(script(seed, "256"), `x.Sweep("ebn0_db", 0, 3)`, `x.Sweep("ebn0_db", 3)`, 1)
	}
	os.WriteFile(exp, []byte(tiny(0)), 0o644)
	lines := make(chan struct{}, 100)
	log := writerFunc(func(p []byte) (int, error) {
		if bytes.Contains(p, []byte("ber=")) {
			lines <- struct{}{}
		}
		return len(p), nil
	})
	ctx, cancel := context.WithCancel(context.Background())
	ended := make(chan error, 1)
	go func() {
		ended <- Run(ctx, []string{exp}, Config{Host: host.Config{Log: log, Workers: 1}, Out: &lockedBuffer{}})
	}()
	<-lines // the first run
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		os.WriteFile(exp, []byte(tiny(i+1)), 0o644)
		<-lines
	}
	b.StopTimer()
	cancel()
	<-ended
}

type writerFunc func(p []byte) (int, error)

func (f writerFunc) Write(p []byte) (int, error) { return f(p) }
