package watch

import (
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"tally/runtime/host"
	"tally/runtime/output"
	"tally/runtime/result"
)

// sweepScript is a small experiment of tally's blocks: a curve per modem, the K = 7 code with
// hard Viterbi decoding (its errors come in bursts) over AWGN with a phase offset. edit
// replaces text in it: the parameter or rule a save changes.
func sweepScript(edits ...string) string {
	s := `//go:build ignore

package main

import (
	"tally/blocks/channel"
	"tally/blocks/fec"
	"tally/blocks/impair"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/source"
	"tally/blocks/stop"
	"tally/runtime/sim"
)

func main() {
	x := sim.New("watched sweep")
	x.Sweep("ebn0_db", 3, 4)
	x.SweepLabels("curve", CURVES)
	x.Link(func(p sim.Point) *link.Link {
		c, m := fec.Conv(), modem.QPSK()
		deg := 0.0
		if p.Label("curve") == "c2" {
			deg = PHASE
		}
		return link.Chain(source.Random(600), c.Encoder(), m.Mod(), impair.Phase(deg), channel.AWGN(p.Get("ebn0_db")), m.Demod(), c.Decoder())
	})
	x.Stop(RULES)
	x.Run()
}
`
	// The edits come first: the replacer takes the first pair that matches.
	r := strings.NewReplacer(append(edits, "CURVES", `"c1"`, "PHASE", "0", "RULES", "stop.Errors(40), stop.Bits(3e5)")...)
	return r.Replace(s)
}

// fresh runs script in a folder of its own, as tally run would, and gives its outputs folder.
func fresh(t *testing.T, script string) string {
	t.Helper()
	path := filepath.Join(t.TempDir(), "exp.go")
	write(t, path, script)
	if err := host.Run(context.Background(), path, host.Config{Quiet: true}); err != nil {
		t.Fatal(err)
	}
	return output.Dir(path)
}

// sameOutputs fails unless the watched run wrote the table and per-frame counts a fresh run
// of the same script writes.
func sameOutputs(t *testing.T, watched, freshDir string) {
	t.Helper()
	for _, name := range []string{"table.csv", output.FramesName} {
		if read(t, filepath.Join(watched, name)) != read(t, filepath.Join(freshDir, name)) {
			t.Errorf("%s differs from a fresh run's", name)
		}
	}
}

func changesOf(e seen) string { return strings.Join(e.Changes, "\n") }

// The case that made every point CHANGED: only a stop rule changes, on a link whose errors
// come in bursts. The link and seed are the same, so the frames are the same: the report says
// so and tests nothing, the points run on from the last run's frames instead of from frame 0,
// and the table is the one a fresh run of the saved script gives.
func TestWatchStopRuleOnlySameFrames(t *testing.T) {
	dir := t.TempDir()
	exp := filepath.Join(dir, "exp.go")
	write(t, exp, sweepScript("CURVES", `"c1", "c2"`))
	h := start(t, exp)
	first := h.wait(Finished, exp)
	bursty := false
	for _, p := range first.Run.Points {
		bursty = bursty || strings.Contains(p.Taps[0].Method, "+clustered")
	}
	if !bursty {
		t.Fatal("no point's errors were shown bursty: the case tests nothing")
	}
	saved := sweepScript("CURVES", `"c1", "c2"`, "RULES", "stop.Errors(120), stop.Bits(3e5)")
	write(t, exp, saved)
	e := h.wait(Finished, exp)
	got := changesOf(e)
	if !strings.Contains(got, "all 4 points: same link and seed, so the same frames (not tested); all 4 points with new stop rules") {
		t.Errorf("no same-frames line:\n%s", got)
	}
	if strings.Contains(got, "CHANGED") || strings.Contains(got, "p =") {
		t.Errorf("a stop rule change was tested:\n%s", got)
	}
	for i, p := range e.Run.Points {
		if was := first.Run.Points[i].Frames; p.FramesReused != was || p.Frames <= was {
			t.Errorf("point %d: %d frames, %d of them replayed; the last run had %d", i, p.Frames, p.FramesReused, was)
		}
	}
	sameOutputs(t, filepath.Join(dir, "exp"), fresh(t, saved))

	// Back to the first rules: every point ends within the replayed frames, none computed.
	write(t, exp, sweepScript("CURVES", `"c1", "c2"`))
	e = h.wait(Finished, exp)
	for i, p := range e.Run.Points {
		if p.FramesReused != p.Frames || p.Frames != first.Run.Points[i].Frames {
			t.Errorf("point %d: %d frames, %d replayed; want the first run's %d, all replayed", i, p.Frames, p.FramesReused, first.Run.Points[i].Frames)
		}
	}
	if got := changesOf(e); !strings.Contains(got, "reused (the last run's frames replayed, none computed): all 4 points") {
		t.Errorf("no reused line:\n%s", got)
	}
}

// A save that changes one curve of six reruns that curve's points only; the others replay the
// last run's frames. The report names the reused curves, and tests the changed curve's points
// frame by frame (paired) — a 30° phase offset on QPSK is a real change, shown as such; the
// table is a fresh run's.
func TestWatchOneCurveOfSix(t *testing.T) {
	dir := t.TempDir()
	exp := filepath.Join(dir, "exp.go")
	six := `"c1", "c2", "c3", "c4", "c5", "c6"`
	write(t, exp, sweepScript("CURVES", six, "RULES", "stop.Bits(6e4)"))
	h := start(t, exp)
	h.wait(Finished, exp)
	saved := sweepScript("CURVES", six, "RULES", "stop.Bits(6e4)", "PHASE", "30")
	write(t, exp, saved)
	e := h.wait(Finished, exp)
	for _, p := range e.Run.Points {
		changed := e.Run.Value(p, 1) == "c2"
		if reused := p.FramesReused == p.Frames && p.Frames > 0; reused == changed || !changed && p.FramesReused == 0 {
			t.Errorf("%s: %d of %d frames replayed", label(e.Run, p), p.FramesReused, p.Frames)
		}
	}
	got := changesOf(e)
	t.Logf("the report:\n%s", got)
	for _, want := range []string{
		"10 points: same link and seed, so the same frames (not tested)",
		"reused (the last run's frames replayed, none computed): curve=c1 all 2, curve=c3 all 2, curve=c4 all 2, curve=c5 all 2, curve=c6 all 2",
		"CHANGED, p",
		"(paired, 100 frames)",
		"Holm-adjusted over 2 points",
	} {
		if !strings.Contains(got, want) {
			t.Errorf("the report lacks %q:\n%s", want, got)
		}
	}
	if strings.Contains(got, "Fisher") {
		t.Errorf("Fisher's test used with per-frame counts at hand:\n%s", got)
	}
	sameOutputs(t, filepath.Join(dir, "exp"), fresh(t, saved))
}

// Results of an older tally (no fingerprints, no frames.gz) are still compared, on their
// totals (Fisher, as before), and the report says why; nothing is reused from them.
func TestWatchOlderResultsFallBack(t *testing.T) {
	dir := t.TempDir()
	exp := filepath.Join(dir, "exp.go")
	write(t, exp, sweepScript("RULES", "stop.Bits(6e4)", "CURVES", `"c1", "c2"`))
	if err := host.Run(context.Background(), exp, host.Config{Quiet: true}); err != nil {
		t.Fatal(err)
	}
	out := output.Dir(exp)
	if err := os.Remove(filepath.Join(out, output.FramesName)); err != nil {
		t.Fatal(err)
	}
	r := output.ReadRecord(out)
	for i := range r.Points {
		r.Points[i].LinkFingerprint, r.Points[i].RulesFingerprint = "", ""
	}
	rec, err := output.Record(r)
	if err != nil {
		t.Fatal(err)
	}
	write(t, filepath.Join(out, "run.json"), string(rec))

	write(t, exp, sweepScript("RULES", "stop.Bits(6e4)", "CURVES", `"c1", "c2"`, "PHASE", "30"))
	h := start(t, exp)
	e := h.wait(Finished, exp)
	got := changesOf(e)
	t.Logf("the report:\n%s", got)
	for _, want := range []string{"CHANGED", "(Fisher on totals)", "where a run kept no per-frame counts (an older results folder)"} {
		if !strings.Contains(got, want) {
			t.Errorf("the report lacks %q:\n%s", want, got)
		}
	}
	for _, p := range e.Run.Points {
		if p.FramesReused != 0 {
			t.Errorf("%s: frames reused from a folder without per-frame counts", label(e.Run, p))
		}
	}
}

// The per-frame counts written beside run.json come back with their points, and only with
// the point whose link fingerprint and frame count they were written for.
func TestFramesFileRoundTrip(t *testing.T) {
	out := fresh(t, sweepScript("RULES", "stop.Bits(6e4)", "CURVES", `"c1", "c2"`))
	r := output.ReadRecord(out)
	n, err := output.ReadFrames(out, r)
	if err != nil || n != len(r.Points) {
		t.Fatalf("%d of %d points got their frames (%v)", n, len(r.Points), err)
	}
	for _, p := range r.Points {
		sum := p.Log.Sum(p.Log.Frames)
		if sum[0].Trials != p.Taps[0].Trials || sum[0].Errors != p.Taps[0].Errors || p.Log.Frames != p.Frames {
			t.Errorf("%s: the frames sum to %d errors in %d bits, run.json says %d in %d", label(r, p), sum[0].Errors, sum[0].Trials, p.Taps[0].Errors, p.Taps[0].Trials)
		}
	}
	r2 := output.ReadRecord(out)
	r2.Points[0].LinkFingerprint = "another link"
	r2.Points[1].Frames++
	if n, _ := output.ReadFrames(out, r2); n != len(r2.Points)-2 || r2.Points[0].Log != nil || r2.Points[1].Log != nil {
		t.Errorf("frames given to points they were not written for")
	}
	var none *result.Run = output.ReadRecord(out)
	os.WriteFile(filepath.Join(out, output.FramesName), []byte("torn"), 0o644)
	if n, err := output.ReadFrames(out, none); err == nil || n != 0 {
		t.Errorf("a damaged frames file read: %d points, %v", n, err)
	}
}

// frames.gz is the same bytes for any number of workers, as table.csv is: frames are committed
// in order whatever worker computed them (the engine's contract).
func TestFramesSameForAnyWorkers(t *testing.T) {
	script := sweepScript("CURVES", `"c1", "c2"`)
	var got []string
	for _, workers := range []int{1, 3} {
		path := filepath.Join(t.TempDir(), "exp.go")
		write(t, path, script)
		if err := host.Run(context.Background(), path, host.Config{Quiet: true, Workers: workers}); err != nil {
			t.Fatal(err)
		}
		got = append(got, read(t, filepath.Join(output.Dir(path), output.FramesName)))
	}
	if got[0] != got[1] {
		t.Error("frames.gz differs between 1 and 3 workers")
	}
}

// A paired script (sim.Variants) whose stop rule alone changed computes the same frames for
// every variant: the report says so and tests nothing, as for a plain sweep.
func TestWatchPairedStopRuleOnlySameFrames(t *testing.T) {
	dir := t.TempDir()
	exp := filepath.Join(dir, "exp.go")
	script := func(bits string, offset ...string) string {
		hot := "0.5"
		if len(offset) > 0 {
			hot = offset[0]
		}
		return `//go:build ignore

package main

import (
	"tally/blocks/channel"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/source"
	"tally/blocks/stop"
	"tally/runtime/sim"
)

func main() {
	x := sim.New("paired")
	ebn0 := x.Axis("ebn0_db", 3, 5)
	x.Variants("rx", "ref", "hot")
	x.Link(func(p sim.Point) *link.Link {
		m := modem.BPSK()
		db := ebn0.At(p)
		if p.Label("rx") == "hot" {
			db += ` + hot + `
		}
		return link.Chain(source.Random(512), m.Mod(), channel.AWGN(db), m.Demod())
	})
	x.Stop(stop.Bits(` + bits + `))
	x.Run()
}
`
	}
	write(t, exp, script("5e4"))
	h := start(t, exp)
	first := h.wait(Finished, exp)
	for _, p := range first.Run.Points {
		if p.LinkFingerprint == "" {
			t.Fatalf("%s: no fingerprint", label(first.Run, p))
		}
	}
	write(t, exp, script("1e5"))
	e := h.wait(Finished, exp)
	got := changesOf(e)
	if !strings.Contains(got, "all 4 points: same link and seed, so the same frames (not tested)") {
		t.Errorf("no same-frames line:\n%s", got)
	}
	if strings.Contains(got, "CHANGED") || strings.Contains(got, "p =") {
		t.Errorf("a stop rule change was tested:\n%s", got)
	}

	// The better variant made 2 dB better: its rows are tested frame by frame against the last
	// run's (each variant keeps its own per-frame counts), the reference's are the same frames.
	write(t, exp, script("1e5", "2.5"))
	e = h.wait(Finished, exp)
	got = changesOf(e)
	if !strings.Contains(got, "2 of 4 points: same link and seed") && !strings.Contains(got, "the same number of errors in every frame") {
		t.Errorf("the reference's rows not summed up as unchanged:\n%s", got)
	}
	if strings.Count(got, "  CHANGED, ") != 2 || strings.Count(got, "(paired, ") != 2 {
		t.Errorf("want the two hot rows CHANGED, tested paired:\n%s", got)
	}
}
