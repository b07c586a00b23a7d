package isolate

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"tally/runtime/compile"
	"tally/runtime/host"
	"tally/runtime/result"
)

// The hand-over tests build one script with the Go toolchain, once, into a cache shared by
// the tests of this package (TestMain), from a folder outside the repository: the build takes
// tally's source from the snapshot embedded in the binary, as for a script in any folder.

func TestMain(m *testing.M) {
	if Child() {
		os.Exit(Serve())
	}
	dir, err := os.MkdirTemp("", "tally-handover-cache-")
	if err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(1)
	}
	testCache = dir
	code := m.Run()
	os.RemoveAll(dir)
	os.Exit(code)
}

var testCache string

// handoverScript runs plain blocks and a block of its own (a sign flip that undoes itself),
// so both run compiled after a hand-over. Point 1 needs tens of frames.
const handoverScript = `//go:build ignore

package main

import (
	"tally/blocks/channel"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/rng"
	"tally/blocks/source"
	"tally/blocks/stop"
	"tally/runtime/sim"
)

func main() {
	x := sim.New("hand-over")
	x.Sweep("ebn0_db", 3, 4.5, 6)
	x.Link(func(p sim.Point) *link.Link {
		m := modem.BPSK()
		flip := link.Func("flip", func(f *link.Frame, r *rng.Stream) {
			for i := range f.Samples {
				f.Samples[i] = -f.Samples[i]
			}
			for i := range f.Samples {
				f.Samples[i] = -f.Samples[i]
			}
		})
		return link.Chain(source.Random(512), m.Mod(), flip, channel.AWGN(p.Get("ebn0_db")), m.Demod())
	})
	x.Stop(stop.Errors(60), stop.Bits(1e6))
	x.Run()
}
`

// runScript runs the script in a fresh folder outside the repository and returns its table,
// its run record and what it logged.
func runScript(t *testing.T, dir string, h *Handover) (table []byte, rec *result.Run, log string) {
	t.Helper()
	path := filepath.Join(dir, "handover.go")
	if err := os.WriteFile(path, []byte(handoverScript), 0o644); err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	err := Run(context.Background(), path, Config{Host: host.Config{Workers: 2, Log: &buf}, Handover: h})
	if err != nil {
		t.Fatalf("run: %v\n%s", err, buf.String())
	}
	table, err = os.ReadFile(filepath.Join(dir, "handover", "table.csv"))
	if err != nil {
		t.Fatal(err)
	}
	b, err := os.ReadFile(filepath.Join(dir, "handover", "run.json"))
	if err != nil {
		t.Fatal(err)
	}
	rec = &result.Run{}
	if err := json.Unmarshal(b, rec); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(filepath.Join(dir, "handover", "checkpoint.tally")); err == nil {
		t.Errorf("the finished run left its checkpoint")
	}
	return table, rec, buf.String()
}

// A run handed over to the compiled script in the middle of a point, or between two points,
// writes the interpreted run's table byte for byte (the engine contract: a run is its committed
// counts); the record says where it changed hands, and no point is reported twice.
func TestHandoverSameTable(t *testing.T) {
	if testing.Short() {
		t.Skip("builds a script with the Go toolchain")
	}
	want, rec, _ := runScript(t, t.TempDir(), nil)
	if rec.Execution == nil || rec.Execution.How != "interpreted" || rec.Mode != "interpreted" {
		t.Fatalf("interpreted run recorded %+v, mode %s", rec.Execution, rec.Mode)
	}
	for _, c := range []struct {
		name string
		at   result.Spot
	}{{"mid-point", result.Spot{Point: 1, Frame: 5}}, {"between points", result.Spot{Point: 2, Frame: 0}}} {
		t.Run(c.name, func(t *testing.T) {
			got, rec, log := runScript(t, t.TempDir(), &Handover{Cache: testCache, At: &c.at})
			if !bytes.Equal(got, want) {
				t.Errorf("table after a hand-over differs:\n%s\ninterpreted:\n%s", got, want)
			}
			e := rec.Execution
			if e == nil || e.How != "handed-over" || e.At == nil || rec.Mode != "compiled" {
				t.Fatalf("recorded %+v (mode %s), want handed-over; log:\n%s", e, rec.Mode, log)
			}
			if e.At.Point != c.at.Point || (c.at.Frame == 0) != (e.At.Frame == 0) || e.At.Frame < c.at.Frame {
				t.Errorf("handed over at %+v, asked %+v", *e.At, c.at)
			}
			if n := strings.Count(log, "handed over to the compiled script"); n != 1 {
				t.Errorf("the hand-over is told %d times:\n%s", n, log)
			}
			for _, v := range []string{"ebn0_db=3 ", "ebn0_db=4.5 ", "ebn0_db=6 "} {
				if n := strings.Count(log, v); n != 1 {
					t.Errorf("point %q told %d times:\n%s", v, n, log)
				}
			}
		})
	}
	// The same bytes find the binary built.
	b, err := compile.Script(context.Background(), compile.Request{Script: filepath.Join(t.TempDir(), "handover.go"), Source: []byte(handoverScript), Cache: testCache, Tool: host.Version})
	if err != nil || !b.Cached {
		t.Errorf("second build of the same bytes: %+v, %v; want found in the cache", b, err)
	}
}

// Where no build can be made the run stays interpreted, writes the interpreted table and says
// why once, however many runs share the hand-over settings (a watch).
func TestHandoverUnavailable(t *testing.T) {
	want, _, _ := runScript(t, t.TempDir(), nil)
	realGo, lookErr := lookGo()
	cases := []struct {
		name, gobody, why string
	}{
		{"no toolchain", "", "no Go toolchain (go) on PATH"},
		// A build error the interpreter did not see, as the compiler words one.
		{"build error", "#!/bin/sh\ncase \"$1\" in env) exec " + realGo + " \"$@\";; esac\necho '# command-line-arguments' >&2\necho './main.go:7:2: undefined: nowhere' >&2\nexit 1\n",
			"the compiler refused the script: " + "handover.go:7:2: undefined: nowhere"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if c.gobody != "" && lookErr != nil {
				t.Skip("no go command to stand in for")
			}
			bin := t.TempDir()
			if c.gobody != "" {
				if err := os.WriteFile(filepath.Join(bin, "go"), []byte(c.gobody), 0o755); err != nil {
					t.Fatal(err)
				}
			}
			t.Setenv("PATH", bin)
			h := &Handover{Cache: t.TempDir(), At: &result.Spot{Point: 1, Frame: 2}}
			var logs string
			dir := t.TempDir()
			for range 2 {
				got, rec, log := runScript(t, dir, h)
				logs += log
				if !bytes.Equal(got, want) {
					t.Errorf("table differs from the interpreted one:\n%s", got)
				}
				if e := rec.Execution; e == nil || e.How != "interpreted" || !strings.Contains(e.Why, strings.TrimPrefix(c.why, "the compiler refused the script: ")) {
					t.Errorf("recorded %+v, want interpreted because %q", e, c.why)
				}
			}
			if n := strings.Count(logs, "note: the run stays interpreted: "); n != 1 || !strings.Contains(logs, strings.TrimPrefix(c.why, "the compiler refused the script: ")) {
				t.Errorf("why told %d times in two runs, want once:\n%s", n, logs)
			}
		})
	}
}

func lookGo() (string, error) {
	for _, d := range filepath.SplitList(os.Getenv("PATH")) {
		p := filepath.Join(d, "go")
		if st, err := os.Stat(p); err == nil && !st.IsDir() {
			return p, nil
		}
	}
	return "", os.ErrNotExist
}
