package main

import (
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// pairedScript compares two binary symmetric channels on the same bits and the same draws (the
// channel block takes the role "bsc" in both): "worse" flips a bit at the reference's draws
// and at a few more. Each frame sleeps a millisecond so a run can be interrupted.
const pairedScript = `//go:build ignore

package main

import (
	"time"

	"tally/blocks/link"
	"tally/blocks/rng"
	"tally/blocks/stop"
	"tally/runtime/sim"
)

func main() {
	x := sim.New("paired channels")
	x.Sweep("p", 0.02, 0.01)
	x.Variants("channel", "ref", "worse")
	x.Link(func(pt sim.Point) *link.Link {
		p := pt.Get("p")
		if pt.Label("channel") == "worse" {
			p *= 1.3
		}
		var bits, hard []byte
		src := link.Func("src", func(f *link.Frame, r *rng.Stream) {
			bits = link.GrowBytes(bits, 64)
			r.Bits(bits)
			f.Bits = bits
			f.Coded = bits
		})
		var bsc link.Block = link.Func("bsc", func(f *link.Frame, r *rng.Stream) {
			hard = link.GrowBytes(hard, len(f.Bits))
			for i, b := range f.Bits {
				if r.Float64() < p {
					b ^= 1
				}
				hard[i] = b
			}
			f.Hard = hard
			time.Sleep(time.Millisecond)
		})
		return link.Chain(src, bsc)
	})
	x.Stop(stop.Shown(), stop.Bits(40000))
	x.Run()
}
`

// A paired comparison through the long-run machinery: interrupted and resumed, and split into
// shards and merged, its table (the comparison columns included) is the table of one run.
func TestPairedLongRuns(t *testing.T) {
	if testing.Short() {
		t.Skip("builds and runs the binary")
	}
	bin := tallyBinary(t)
	write := func(dir string) {
		if err := os.WriteFile(filepath.Join(dir, "pair.go"), []byte(pairedScript), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	dir := t.TempDir()
	write(dir)
	if p := tally(t, bin, dir, "run", "-quiet", "pair.go"); p.code != 0 {
		t.Fatalf("reference run: exit %d\n%s", p.code, p.stderr)
	}
	want := table(t, filepath.Join(dir, "pair"))
	if !strings.Contains(want, ",diff_p\n") || !strings.Contains(want, ",worse,") {
		t.Fatalf("reference table:\n%s", want)
	}

	t.Run("interrupt and resume", func(t *testing.T) {
		dir := t.TempDir()
		write(dir)
		cmd := exec.Command(bin, "run", "-quiet", "-workers", "1", "-checkpoint", "20ms", "pair.go")
		cmd.Dir = dir
		interruptOnceSaved(t, cmd, filepath.Join(dir, "pair", "checkpoint.tally"))
		if p := tally(t, bin, dir, "run", "-quiet", "-resume", "pair.go"); p.code != 0 {
			t.Fatalf("resume: exit %d\n%s", p.code, p.stderr)
		}
		if got := table(t, filepath.Join(dir, "pair")); got != want {
			t.Errorf("resumed table differs:\n%s\nwant\n%s", got, want)
		}
	})
	t.Run("shards", func(t *testing.T) {
		dir := t.TempDir()
		write(dir)
		shard := func(extra ...string) {
			for _, s := range []string{"0/2", "1/2"} {
				if p := tally(t, bin, dir, append([]string{"run", "-quiet", "-shard", s}, append(extra, "pair.go")...)...); p.code != 0 {
					t.Fatalf("shard %s: exit %d\n%s", s, p.code, p.stderr)
				}
			}
		}
		shard()
		p := tally(t, bin, dir, "merge", "-quiet", "pair")
		for round := 0; p.code == exitShort && round < 3; round++ {
			shard("-extend") // the shards judge their end on an estimate; the merge on the frames
			p = tally(t, bin, dir, "merge", "-quiet", "pair")
		}
		if p.code != 0 {
			t.Fatalf("merge: exit %d\n%s", p.code, p.stderr)
		}
		if got := table(t, filepath.Join(dir, "pair")); got != want {
			t.Errorf("merged table differs:\n%s\nwant\n%s", got, want)
		}
	})
}
