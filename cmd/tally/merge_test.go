package main

import (
	"bytes"
	"compress/gzip"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"

	"tally/runtime/isolate"
	"tally/runtime/longrun"
	"tally/runtime/output"
	"tally/runtime/result"
)

// slowScript is a binary symmetric channel on 64-bit frames that sleeps a millisecond per
// frame, so a run lasts long enough to be killed in the middle; its four points end on errors
// and the last on its bit cap.
const slowScript = `//go:build ignore

package main

import (
	"time"

	"tally/blocks/link"
	"tally/blocks/rng"
	"tally/blocks/stop"
	"tally/runtime/sim"
)

func main() {
	x := sim.New("slow link")
	x.Sweep("p", 0.05, 0.02, 0.01, 0.004)
	x.Link(func(pt sim.Point) *link.Link {
		p := pt.Get("p")
		var bits, hard []byte
		src := link.Func("src", func(f *link.Frame, r *rng.Stream) {
			bits = link.GrowBytes(bits, 64)
			r.Bits(bits)
			f.Bits = bits
			f.Coded = bits
		})
		bsc := link.Func("bsc", func(f *link.Frame, r *rng.Stream) {
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
	x.Stop(stop.Errors(100), stop.Bits(20000))
	x.Run()
}
`

// tallyBinary is the command built once (by TestMain's first caller) into a temporary folder.
func tallyBinary(t *testing.T) string {
	t.Helper()
	binOnce.Do(func() {
		dir, err := os.MkdirTemp("", "tally-test-bin-")
		if err != nil {
			binErr = err
			return
		}
		binDir = dir
		binPath = filepath.Join(dir, "tally")
		out, err := exec.Command("go", "build", "-o", binPath, ".").CombinedOutput()
		if err != nil {
			binErr = fmt.Errorf("go build: %v\n%s", err, out)
		}
	})
	if binErr != nil {
		t.Fatal(binErr)
	}
	return binPath
}

var (
	binOnce         sync.Once
	binDir, binPath string
	binErr          error
)

func TestMain(m *testing.M) {
	if isolate.Child() {
		// Runs started by tests that call dispatch in this process run in this binary.
		os.Exit(isolate.Serve())
	}
	// Runs stay interpreted: a hand-over to the compiled script, timed by a build, would make
	// these tests' crashes and interrupts depend on the machine (runtime/isolate tests it).
	os.Setenv(envInterpreted, "1")
	code := m.Run()
	if binDir != "" {
		os.RemoveAll(binDir)
	}
	os.Exit(code)
}

// script writes the slow script (plus extra text) as dir/<name>.go.
func script(t *testing.T, dir, name, extra string) string {
	t.Helper()
	path := filepath.Join(dir, name+".go")
	if err := os.WriteFile(path, []byte(slowScript+extra), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

type proc struct {
	code           int
	stdout, stderr string
}

// tally runs the binary in dir and waits for it.
func tally(t *testing.T, bin, dir string, args ...string) proc {
	t.Helper()
	cmd := exec.Command(bin, args...)
	cmd.Dir = dir
	var o, e bytes.Buffer
	cmd.Stdout, cmd.Stderr = &o, &e
	err := cmd.Run()
	var ee *exec.ExitError
	if err != nil && !errors.As(err, &ee) {
		t.Fatal(err)
	}
	return proc{code: cmd.ProcessState.ExitCode(), stdout: o.String(), stderr: e.String()}
}

// withFrames is table.csv with the per-frame counts kept beside it (frames.gz, decompressed
// and shown in hex): a resumed or merged run keeps the same frames as one uninterrupted run.
func withFrames(t *testing.T, dir string) string {
	t.Helper()
	f, err := os.Open(filepath.Join(dir, output.FramesName))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	zr, err := gzip.NewReader(f)
	if err != nil {
		t.Fatal(err)
	}
	raw, err := io.ReadAll(zr)
	if err != nil {
		t.Fatal(err)
	}
	return table(t, dir) + "\nframes.gz: " + hex.EncodeToString(raw)
}

func table(t *testing.T, dir string) string {
	t.Helper()
	b, err := os.ReadFile(filepath.Join(dir, "table.csv"))
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

// TestLongRuns runs the tally binary as separate processes: killed and resumed, and split
// into shards and merged, the table is byte for byte the table of one uninterrupted run.
func TestLongRuns(t *testing.T) {
	if testing.Short() {
		t.Skip("builds and runs the binary")
	}
	bin := tallyBinary(t)
	dir := t.TempDir()
	script(t, dir, "slow", "")
	if p := tally(t, bin, dir, "run", "-quiet", "slow.go"); p.code != 0 {
		t.Fatalf("reference run: exit %d\n%s", p.code, p.stderr)
	}
	want := withFrames(t, filepath.Join(dir, "slow"))
	if r := output.ReadRecord(filepath.Join(dir, "slow")); r == nil {
		t.Fatal("no run.json")
	} else if n, err := output.ReadFrames(filepath.Join(dir, "slow"), r); n != len(r.Points) {
		t.Fatalf("frames.gz holds %d of %d points (%v)", n, len(r.Points), err)
	}
	if _, err := os.Stat(filepath.Join(dir, "slow", "checkpoint.tally")); err == nil {
		t.Errorf("a complete run left its checkpoint")
	}

	t.Run("kill and resume", func(t *testing.T) { killResume(t, bin, want) })
	t.Run("refuse to resume", func(t *testing.T) { refuseResume(t, bin) })
	for _, n := range []int{3, 4} {
		t.Run(fmt.Sprintf("%d shards", n), func(t *testing.T) { shards(t, bin, n, want) })
	}
	t.Run("extend an interrupted shard", func(t *testing.T) { extendShard(t, bin, want) })
	t.Run("refuse to merge", func(t *testing.T) { refuseMerge(t, bin) })
}

// killResume kills (SIGKILL) runs at several moments, each resumed from the checkpoint the
// last left, until one finishes. The saved progress never goes back.
func killResume(t *testing.T, bin, want string) {
	dir := t.TempDir()
	script(t, dir, "slow", "")
	ck := filepath.Join(dir, "slow", longrun.CheckpointName)
	kills := 0
	var saved int64 // frames in the checkpoint
	for _, after := range []time.Duration{130, 170, 210, 190, 250, 230, 300, 400, 700, 1000, 2000, 4000} {
		cmd := exec.Command(bin, "run", "-resume", "-workers", "1", "-checkpoint", "20ms", "slow.go")
		cmd.Dir = dir
		var e bytes.Buffer
		cmd.Stderr = &e
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		done := make(chan error, 1)
		go func() { done <- cmd.Wait() }()
		select {
		case err := <-done:
			if err != nil {
				t.Fatalf("resumed run: %v\n%s", err, e.String())
			}
			t.Logf("finished after %d kills", kills)
			if kills < 3 {
				t.Errorf("the run finished after %d kills; the test meant to kill it at least 3 times", kills)
			}
			if saved > 0 && !strings.Contains(e.String(), "resume: ") {
				t.Errorf("the last run did not resume from the checkpoint:\n%s", e.String())
			}
			if got := withFrames(t, filepath.Join(dir, "slow")); got != want {
				t.Errorf("after %d kills the table or the per-frame counts differ:\n%s\nwant\n%s", kills, got, want)
			}
			return
		case <-time.After(after * time.Millisecond):
			cmd.Process.Signal(syscall.SIGKILL)
			<-done
			kills++
		}
		c, err := longrun.LoadCheckpoint(ck)
		if errors.Is(err, os.ErrNotExist) {
			// No checkpoint yet, or the run had finished (outputs written, checkpoint removed)
			// when the kill came: the next run starts afresh, which is no loss of progress.
			saved = 0
			continue
		}
		if err != nil {
			t.Fatalf("after kill %d: %v", kills, err)
		}
		var n int64
		for _, p := range c.Points {
			n += p.Frames
		}
		if n < saved {
			t.Errorf("after kill %d the checkpoint holds %d frames, before %d: progress lost", kills, n, saved)
		}
		saved = n
	}
	t.Fatal("the run never finished")
}

func refuseResume(t *testing.T, bin string) {
	dir := t.TempDir()
	script(t, dir, "slow", "")
	ck := filepath.Join(dir, "slow", "checkpoint.tally")
	// Interrupt a run (Ctrl-C): it keeps its checkpoint.
	cmd := exec.Command(bin, "run", "-quiet", "-workers", "1", "-checkpoint", "20ms", "slow.go")
	cmd.Dir = dir
	interruptOnceSaved(t, cmd, ck)
	good, err := os.ReadFile(ck)
	if err != nil {
		t.Fatalf("an interrupted run left no checkpoint: %v", err)
	}

	if p := tally(t, bin, dir, "run", "-quiet", "-resume", "-seed", "2", "slow.go"); p.code != 1 || !strings.Contains(p.stderr, "seed 1") || !strings.Contains(p.stderr, "-restart") {
		t.Errorf("resume with another seed: exit %d, %q; want a refusal naming the seed and -restart", p.code, p.stderr)
	}
	script(t, dir, "slow", "\n// edited\n")
	if p := tally(t, bin, dir, "run", "-quiet", "-resume", "slow.go"); p.code != 1 || !strings.Contains(p.stderr, "another version of the script") {
		t.Errorf("resume of an edited script: exit %d, %q; want a refusal", p.code, p.stderr)
	}
	script(t, dir, "slow", "")
	// A torn checkpoint (cut anywhere) is refused, never read as valid.
	for _, n := range []int{len(good) / 3, len(good) - 1} {
		os.WriteFile(ck, good[:n], 0o644)
		if p := tally(t, bin, dir, "run", "-quiet", "-resume", "slow.go"); p.code != 1 || !strings.Contains(p.stderr, "damaged") {
			t.Errorf("resume from a checkpoint cut to %d of %d bytes: exit %d, %q; want a refusal", n, len(good), p.code, p.stderr)
		}
	}
	if p := tally(t, bin, dir, "run", "-quiet", "-restart", "-checkpoint", "0", "slow.go"); p.code != 0 {
		t.Errorf("-restart: exit %d, %q", p.code, p.stderr)
	}
}

// interruptOnceSaved starts cmd and interrupts it (Ctrl-C) as soon as it has saved file.
func interruptOnceSaved(t *testing.T, cmd *exec.Cmd, file string) {
	t.Helper()
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	for deadline := time.Now().Add(10 * time.Second); time.Now().Before(deadline); time.Sleep(2 * time.Millisecond) {
		if _, err := os.Stat(file); err == nil {
			break
		}
	}
	cmd.Process.Signal(os.Interrupt)
	cmd.Wait()
	if c := cmd.ProcessState.ExitCode(); c != 130 {
		t.Fatalf("interrupted run: exit %d, want 130 (did it finish before the interrupt?)", c)
	}
}

// shards runs n shards as separate processes (two at a time) and merges them.
func shards(t *testing.T, bin string, n int, want string) {
	dir := t.TempDir()
	script(t, dir, "slow", "")
	runShards(t, bin, dir, n, nil)
	p := tally(t, bin, dir, "merge", "-quiet", "slow")
	for round := 0; p.code == exitShort && round < 2; round++ {
		// The shards' estimate erred low (rare): a further round extends them.
		t.Logf("merge of %d shards fell short, extending:\n%s", n, p.stderr)
		runShards(t, bin, dir, n, []string{"-extend"})
		p = tally(t, bin, dir, "merge", "-quiet", "slow")
	}
	if p.code != 0 {
		t.Fatalf("merge: exit %d\n%s", p.code, p.stderr)
	}
	if got := withFrames(t, filepath.Join(dir, "slow")); got != want {
		t.Errorf("merged table or per-frame counts of %d shards differ:\n%s\nwant\n%s", n, got, want)
	}
	shardRecord(t, dir, n)
}

// shardRecord checks the merged run.json's record of its shards against the shard files
// themselves (SHA-256 from crypto/sha256, bits summed from the files) and the table's bits.
func shardRecord(t *testing.T, dir string, n int) {
	t.Helper()
	b, err := os.ReadFile(filepath.Join(dir, "slow", "run.json"))
	if err != nil {
		t.Fatal(err)
	}
	var run result.Run
	if err := json.Unmarshal(b, &run); err != nil {
		t.Fatal(err)
	}
	r := run.Shards
	if r == nil || r.Count != n || len(r.Files) != n {
		t.Fatalf("run.json of a merge of %d shards records %+v", n, r)
	}
	host, _ := os.Hostname()
	var bits, used int64
	for i, f := range r.Files {
		path := filepath.Join(dir, "slow", "shards", f.File)
		raw, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		sum := sha256.Sum256(raw)
		sf, err := longrun.LoadShard(path)
		if err != nil {
			t.Fatal(err)
		}
		var computed int64
		for k := range sf.Points {
			computed += sf.Points[k].Sum()[0].Trials
		}
		if f.Shard != i || f.SHA256 != hex.EncodeToString(sum[:]) || f.Host != host || f.Bits != computed {
			t.Errorf("shard %d recorded as %+v; the file has SHA-256 %x, %d bits, host %q", i, f, sum, computed, host)
		}
		bits += computed
	}
	for _, p := range run.Points {
		used += p.Taps[0].Trials
	}
	want := float64(bits-used) / float64(used)
	if r.Bits != bits || r.Used != used || math.Abs(r.Overshoot-want) > 1e-12 || bits < used {
		t.Errorf("recorded %d bits computed, %d used, overshoot %g; the files hold %d, the table %d (%g)", r.Bits, r.Used, r.Overshoot, bits, used, want)
	}
}

func runShards(t *testing.T, bin, dir string, n int, extra []string) {
	for i := 0; i < n; i += 2 {
		var cmds []*exec.Cmd
		var errs []*bytes.Buffer
		for k := i; k < n && k < i+2; k++ {
			args := append([]string{"run", "-quiet", "-workers", "1", "-shard", fmt.Sprintf("%d/%d", k, n)}, extra...)
			cmd := exec.Command(bin, append(args, "slow.go")...)
			cmd.Dir = dir
			var e bytes.Buffer
			cmd.Stderr = &e
			if err := cmd.Start(); err != nil {
				t.Fatal(err)
			}
			cmds, errs = append(cmds, cmd), append(errs, &e)
		}
		for k, c := range cmds {
			if err := c.Wait(); err != nil {
				t.Fatalf("shard %d/%d: %v\n%s", i+k, n, err, errs[k])
			}
		}
	}
}

// extendShard interrupts one shard: the merge names the points it lacks and exits 3, and an
// -extend round completes it.
func extendShard(t *testing.T, bin, want string) {
	dir := t.TempDir()
	script(t, dir, "slow", "")
	for _, i := range []int{0, 1} {
		if p := tally(t, bin, dir, "run", "-quiet", "-workers", "1", "-shard", fmt.Sprintf("%d/3", i), "slow.go"); p.code != 0 {
			t.Fatalf("shard %d/3: %s", i, p.stderr)
		}
	}
	cmd := exec.Command(bin, "run", "-quiet", "-workers", "1", "-checkpoint", "20ms", "-shard", "2/3", "slow.go")
	cmd.Dir = dir
	interruptOnceSaved(t, cmd, filepath.Join(dir, "slow", "shards", "shard-2-of-3.tally"))
	p := tally(t, bin, dir, "merge", "slow/shards")
	if p.code != exitShort || !strings.Contains(p.stderr, "-extend") {
		t.Fatalf("merge with an interrupted shard: exit %d, %q; want %d and a hint to -extend", p.code, p.stderr, exitShort)
	}
	if _, err := os.Stat(filepath.Join(dir, "slow", "table.csv")); err == nil {
		t.Errorf("a short merge wrote the table")
	}
	for round := 0; round < 3 && p.code == exitShort; round++ {
		runShards(t, bin, dir, 3, []string{"-extend"})
		p = tally(t, bin, dir, "merge", "-quiet", "slow/shards")
	}
	if p.code != 0 {
		t.Fatalf("merge after -extend: exit %d\n%s", p.code, p.stderr)
	}
	if got := withFrames(t, filepath.Join(dir, "slow")); got != want {
		t.Errorf("merged table after extending differs:\n%s\nwant\n%s", got, want)
	}
}

// refuseMerge: shards of another seed or another script are refused, naming the file.
func refuseMerge(t *testing.T, bin string) {
	dir := t.TempDir()
	script(t, dir, "slow", "")
	// Fast: the cap of 20000 bits is reached after a few hundred frames at most; only the
	// files matter here.
	if p := tally(t, bin, dir, "run", "-quiet", "-shard", "0/2", "slow.go"); p.code != 0 {
		t.Fatal(p.stderr)
	}
	if p := tally(t, bin, dir, "run", "-quiet", "-shard", "1/2", "-seed", "5", "slow.go"); p.code != 0 {
		t.Fatal(p.stderr)
	}
	p := tally(t, bin, dir, "merge", "slow")
	if p.code != 1 || !strings.Contains(p.stderr, "shard-1-of-2.tally") || !strings.Contains(p.stderr, "seed") {
		t.Errorf("merge across seeds: exit %d, %q; want a refusal naming shard-1-of-2.tally", p.code, p.stderr)
	}

	other := t.TempDir()
	script(t, other, "slow", "\n// another script\n")
	if p := tally(t, bin, other, "run", "-quiet", "-shard", "1/2", "slow.go"); p.code != 0 {
		t.Fatal(p.stderr)
	}
	foreign := filepath.Join(other, "slow", "shards", "shard-1-of-2.tally")
	p = tally(t, bin, dir, "merge", filepath.Join("slow", "shards", "shard-0-of-2.tally"), foreign)
	if p.code != 1 || !strings.Contains(p.stderr, foreign) || !strings.Contains(p.stderr, "another script") {
		t.Errorf("merge across scripts: exit %d, %q; want a refusal naming %s", p.code, p.stderr, foreign)
	}
	// The script itself edited since the shards ran.
	if p := tally(t, bin, dir, "run", "-quiet", "-shard", "1/2", "slow.go"); p.code != 0 {
		t.Fatal(p.stderr)
	}
	script(t, dir, "slow", "\n// edited\n")
	if p := tally(t, bin, dir, "merge", "slow"); p.code != 1 || !strings.Contains(p.stderr, "not the script the shards ran") {
		t.Errorf("merge with an edited script: exit %d, %q", p.code, p.stderr)
	}
}
