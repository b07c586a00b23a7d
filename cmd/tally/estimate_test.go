package main

import (
	"os"
	"os/exec"
	"path/filepath"
	"syscall"
	"testing"
	"time"
)

// weightedScript estimates by importance sampling and semi-analytically, paced by a block of
// its own before the noise (allowed there) so a run can be killed in the middle.
const weightedScript = `//go:build ignore

package main

import (
	"time"

	"tally/blocks/channel"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/rng"
	"tally/blocks/source"
	"tally/blocks/stop"
	"tally/runtime/sim"
)

func main() {
	x := sim.New("weighted link")
	x.Sweep("ebn0_db", 9, 12)
	x.SweepLabels("how", "importance", "semi-analytic")
	x.Link(func(p sim.Point) *link.Link {
		m := modem.QAM(16)
		pace := link.Func("pace", func(f *link.Frame, r *rng.Stream) { time.Sleep(time.Millisecond) })
		l := link.Chain(source.Random(256), pace, m.Mod(), channel.AWGN(p.Get("ebn0_db")), m.Demod())
		return l.Estimate(p.Label("how"))
	})
	x.Stop(stop.Precision(1.02), stop.Bits(1.5e5))
	x.Run()
}
`

// The weighted sums travel through worker counts, a kill and resume, and shards and a merge:
// every path writes the table of one uninterrupted single-worker run, byte for byte.
func TestWeightedLongRuns(t *testing.T) {
	if testing.Short() {
		t.Skip("builds and runs the binary")
	}
	bin := tallyBinary(t)
	write := func() string {
		dir := t.TempDir()
		if err := os.WriteFile(filepath.Join(dir, "w.go"), []byte(weightedScript), 0o644); err != nil {
			t.Fatal(err)
		}
		return dir
	}
	dir := write()
	if p := tally(t, bin, dir, "run", "-quiet", "-workers", "1", "w.go"); p.code != 0 {
		t.Fatalf("reference run: exit %d\n%s", p.code, p.stderr)
	}
	want := table(t, filepath.Join(dir, "w"))
	if p := tally(t, bin, dir, "run", "-quiet", "-workers", "3", "w.go"); p.code != 0 || table(t, filepath.Join(dir, "w")) != want {
		t.Errorf("3 workers: exit %d, table\n%s\nwant\n%s", p.code, table(t, filepath.Join(dir, "w")), want)
	}

	// Kill once in the middle, then resume.
	dir = write()
	cmd := exec.Command(bin, "run", "-quiet", "-workers", "1", "-checkpoint", "20ms", "w.go")
	cmd.Dir = dir
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	time.Sleep(700 * time.Millisecond)
	cmd.Process.Signal(syscall.SIGKILL)
	cmd.Wait()
	if p := tally(t, bin, dir, "run", "-quiet", "-resume", "w.go"); p.code != 0 {
		t.Fatalf("resume: exit %d\n%s", p.code, p.stderr)
	}
	if got := table(t, filepath.Join(dir, "w")); got != want {
		t.Errorf("resumed table differs:\n%s\nwant\n%s", got, want)
	}

	// Three shards and a merge (extended while the shards' estimate fell short).
	dir = write()
	run := func(extra ...string) {
		for i := range 3 {
			args := append([]string{"run", "-quiet", "-workers", "1", "-shard", string(rune('0'+i)) + "/3"}, extra...)
			if p := tally(t, bin, dir, append(args, "w.go")...); p.code != 0 {
				t.Fatalf("shard %d: exit %d\n%s", i, p.code, p.stderr)
			}
		}
	}
	run()
	p := tally(t, bin, dir, "merge", "-quiet", "w")
	for round := 0; p.code == exitShort && round < 3; round++ {
		run("-extend")
		p = tally(t, bin, dir, "merge", "-quiet", "w")
	}
	if p.code != 0 {
		t.Fatalf("merge: exit %d\n%s", p.code, p.stderr)
	}
	if got := table(t, filepath.Join(dir, "w")); got != want {
		t.Errorf("merged table differs:\n%s\nwant\n%s", got, want)
	}
}
