package isolate

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
	"time"

	"tally/runtime/host"
	"tally/runtime/longrun"
	"tally/runtime/result"
)

// runSource is runScript for a script of the test's own, with the host settings given.
func runSource(t *testing.T, ctx context.Context, dir, src string, h *Handover, hc host.Config) (*result.Run, string, error) {
	t.Helper()
	path := filepath.Join(dir, "handover.go")
	if err := os.WriteFile(path, []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	hc.Workers, hc.Log = 2, &buf
	err := Run(ctx, path, Config{Host: hc, Handover: h})
	rec := &result.Run{}
	if b, rerr := os.ReadFile(filepath.Join(dir, "handover", "run.json")); rerr == nil {
		if jerr := json.Unmarshal(b, rec); jerr != nil {
			t.Fatal(jerr)
		}
	}
	return rec, buf.String(), err
}

// A run whose links are all tally's blocks computes at compiled speed in the interpreter: no
// build is started for it, and the record says why it stayed interpreted.
func TestNoBuildWithoutOwnBlocks(t *testing.T) {
	src := strings.Replace(handoverScript, "m.Mod(), flip, channel", "m.Mod(), channel", 1)
	src = strings.Replace(src, "		flip := link.Func", "		_ = link.Func", 1)
	cache := t.TempDir()
	rec, log, err := runSource(t, context.Background(), t.TempDir(), src, &Handover{Cache: cache}, host.Config{})
	if err != nil {
		t.Fatalf("%v\n%s", err, log)
	}
	if e := rec.Execution; e == nil || e.How != "interpreted" || !strings.Contains(e.Why, "no block of the script's own") {
		t.Errorf("recorded %+v; want interpreted, for want of a block of the script's own", e)
	}
	if _, err := os.Stat(filepath.Join(cache, "bin")); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("a build was made for a run of tally's blocks only (%v)", err)
	}
}

// slowScript's own block is a per-sample loop, slow interpreted; at 3e7 bits a point the run
// is long interpreted (tens of seconds) and short compiled.
var slowScript = strings.NewReplacer(
	"x.Stop(stop.Errors(60), stop.Bits(1e6))", "x.Stop(stop.Bits(3e7))",
	"source.Random(512)", "source.Random(4096)").Replace(handoverScript)

// Left to itself (no hand-over placed by the test), a long run of a script's own block is
// handed over once the build is ready, and writes the table of a run handed over at its start.
func TestHandoverByItself(t *testing.T) {
	if testing.Short() {
		t.Skip("builds a script with the Go toolchain")
	}
	want, _, err := runSource(t, context.Background(), t.TempDir(), slowScript, &Handover{Cache: testCache, At: &result.Spot{}}, host.Config{})
	if err != nil {
		t.Fatal(err)
	}
	// Interpreted, the run would take a minute or more: one that did not hand over fails here.
	ctx, cancel := context.WithTimeout(context.Background(), 5*time.Minute)
	defer cancel()
	dir := t.TempDir()
	// A cache of its own: the script is built anew however often the test runs (Go's build
	// cache stays warm).
	got, log, err := runSource(t, ctx, dir, slowScript, &Handover{Cache: t.TempDir()}, host.Config{})
	if err != nil {
		t.Fatalf("%v\n%s", err, log)
	}
	if e := got.Execution; e == nil || e.How != "handed-over" || e.At == nil || e.BuildSeconds == 0 {
		t.Fatalf("recorded %+v; want handed over after a build; log:\n%s", e, log)
	}
	if !reflect.DeepEqual(tallies(got), tallies(want)) {
		t.Errorf("counts differ from a run handed over at its start:\n%v\n%v", tallies(got), tallies(want))
	}
}

func tallies(r *result.Run) [][2]int64 {
	var out [][2]int64
	for _, p := range r.Points {
		for _, tp := range p.Taps {
			out = append(out, [2]int64{tp.Trials, tp.Errors})
		}
	}
	return out
}

// A shard's run handed over in the middle of a point leaves the shard file the interpreter
// alone leaves: the same frames' counts for every point, which a merge replays.
func TestHandoverShard(t *testing.T) {
	if testing.Short() {
		t.Skip("builds a script with the Go toolchain")
	}
	part := longrun.Part{Index: 1, Of: 2}
	shard := func(h *Handover) *longrun.ShardFile {
		dir := t.TempDir()
		_, log, err := runSource(t, context.Background(), dir, handoverScript, h, host.Config{Long: &longrun.Settings{Shard: &part}})
		if err != nil {
			t.Fatalf("%v\n%s", err, log)
		}
		if h != nil && !strings.Contains(log, "handed over to the compiled script") {
			t.Errorf("the shard run was not handed over:\n%s", log)
		}
		sf, err := longrun.LoadShard(longrun.ShardPath(filepath.Join(dir, "handover"), part))
		if err != nil {
			t.Fatal(err)
		}
		return sf
	}
	want := shard(nil)
	got := shard(&Handover{Cache: testCache, At: &result.Spot{Point: 1, Frame: 3}})
	if len(got.Points) != len(want.Points) {
		t.Fatalf("%d points in the handed-over shard, %d interpreted", len(got.Points), len(want.Points))
	}
	for i := range want.Points {
		g, w := got.Points[i], want.Points[i]
		if g.Frames != w.Frames || g.Done != w.Done || g.Stop != w.Stop || !reflect.DeepEqual(g.Runs, w.Runs) || g.Fingerprint != w.Fingerprint {
			t.Errorf("point %d: handed over %d frames %v %q %v, interpreted %d frames %v %q %v", i,
				g.Frames, g.Done, g.Stop, g.Runs, w.Frames, w.Done, w.Stop, w.Runs)
		}
	}
}

// Ctrl-C while the run waits for its build (the interpreter stopped at a commit boundary for
// the hand-over) stops the run at once, keeps the checkpoint, and -resume continues it to the
// interpreted run's table.
func TestInterruptDuringHandover(t *testing.T) {
	want, _, _ := runScript(t, t.TempDir(), nil)
	realGo, err := lookGo()
	if err != nil {
		t.Skip("no go command to stand in for")
	}
	// A go command whose builds never end (go env is answered).
	bin := t.TempDir()
	slow := "#!/bin/sh\ncase \"$1\" in env) exec " + realGo + " \"$@\";; esac\nexec sleep 120\n"
	if err := os.WriteFile(filepath.Join(bin, "go"), []byte(slow), 0o755); err != nil {
		t.Fatal(err)
	}
	t.Setenv("PATH", bin+string(os.PathListSeparator)+os.Getenv("PATH"))
	dir := t.TempDir()
	ck := longrun.CheckpointPath(filepath.Join(dir, "handover"))
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	go func() {
		// The interpreter hands over at point 1, frame 2, and leaves its checkpoint there.
		for ctx.Err() == nil {
			if c, err := longrun.LoadCheckpoint(ck); err == nil && len(c.Points) == 2 && c.Points[1].Frames >= 2 {
				time.Sleep(200 * time.Millisecond) // waiting for the build
				cancel()
				return
			}
			time.Sleep(10 * time.Millisecond)
		}
	}()
	start := time.Now()
	_, log, err := runSource(t, ctx, dir, handoverScript, &Handover{Cache: t.TempDir(), At: &result.Spot{Point: 1, Frame: 2}}, host.Config{})
	var ie *Interrupted
	if !errors.As(err, &ie) {
		t.Fatalf("Ctrl-C during the hand-over: %v; want the run interrupted\n%s", err, log)
	}
	if took := time.Since(start); took > 30*time.Second {
		t.Errorf("the interrupted run took %v to end (the build was not stopped?)", took)
	}
	if !strings.Contains(ie.Resume, "-resume") {
		t.Errorf("interrupted run says %q; want how to resume", ie.Error())
	}
	if strings.Contains(log, "handed over to the compiled script") {
		t.Errorf("handed over after Ctrl-C:\n%s", log)
	}
	t.Setenv("PATH", os.Getenv("PATH")[len(bin)+1:])
	if _, log, err := runSource(t, context.Background(), dir, handoverScript, nil, host.Config{Long: &longrun.Settings{Resume: true}}); err != nil {
		t.Fatalf("resume: %v\n%s", err, log)
	}
	got, err := os.ReadFile(filepath.Join(dir, "handover", "table.csv"))
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(got, want) {
		t.Errorf("table resumed after Ctrl-C during a hand-over differs:\n%s\ninterpreted:\n%s", got, want)
	}
}
