package main

import (
	"bytes"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"sync"
	"testing"
	"time"

	"tally/runtime/isolate"
)

// crashScript is a BPSK link over AWGN with a custom block (extra) and declarations (decls) of
// the case; the run is long enough (1e6 bits, about a thousand frames, a point) for a crash to
// strike during it.
func crashScript(name, decls, extra string) string {
	return fmt.Sprintf(`//go:build ignore

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

var _ *rng.Stream

%s

func main() {
	x := sim.New(%q)
	x.Sweep("ebn0_db", 1, 2, 3)
	x.Link(func(p sim.Point) *link.Link {
		m := modem.BPSK()
		extra := link.Func("extra", func(f *link.Frame, r *rng.Stream) {
			%s
		})
		return link.Chain(source.Random(1024), m.Mod(), channel.AWGN(p.Get("ebn0_db")), m.Demod(), extra)
	})
	x.Stop(stop.Bits(1e6))
	x.Run()
}
`, decls, name, extra)
}

// writeScript writes dir/name.go.
func writeScript(t *testing.T, dir, name, src string) string {
	t.Helper()
	p := filepath.Join(dir, name+".go")
	if err := os.WriteFile(p, []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// A script that crashes its process (Go runtime fatal errors, stack overflow, memory, a panic
// in its own goroutine) ends its run, not tally: exit 1, a plain sentence at the script's line
// where it can be known, never a Go trace, and the last good outputs as they were. Before runs
// were isolated each of these ended tally with exit 2 and the runtime's trace.
func TestCrashesEndTheRunNotTally(t *testing.T) {
	if testing.Short() {
		t.Skip("starts processes")
	}
	bin := tallyBinary(t)
	cases := []struct {
		name, decls, extra string
		args               []string
		want               string
		atLine             bool // the message starts with name.go:line:col
	}{
		{"racemap", "var shared = map[int]int{}", "if f.Index >= 50 { for i := 0; i < 200; i++ { shared[i] = shared[i+1] + 1 } }", // past the instance check's frames
			[]string{"-workers", "2"}, "one map from several goroutines at once", true},
		{"recursion", "func down(n int) int { return down(n+1) + 1 }", "down(0)",
			nil, "the script exhausted the stack: endless recursion?", true},
		{"hog", "var keep [][]float64", "keep = append(keep, make([]float64, 1<<20))",
			[]string{"-memory", "256MiB"}, "over its limit of 256MiB (-memory raises it)", true},
		{"gopanic", "func boom() { panic(\"boom in a goroutine\") }", "if f.Index == 3 { go boom() }",
			nil, "a goroutine of the script panicked: boom in a goroutine", false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			// The last good outputs, from a clean version of the script.
			writeScript(t, dir, c.name, crashScript(c.name, c.decls, ""))
			if p := tally(t, bin, dir, "run", "-quiet", c.name+".go"); p.code != 0 {
				t.Fatalf("clean version: exit %d\n%s", p.code, p.stderr)
			}
			out := filepath.Join(dir, c.name)
			good := snapshot(t, out)
			writeScript(t, dir, c.name, crashScript(c.name, c.decls, c.extra))
			start := time.Now()
			p := tally(t, bin, dir, append(append([]string{"run", "-quiet"}, c.args...), c.name+".go")...)
			t.Logf("%s: %.1f s: %s", c.name, time.Since(start).Seconds(), p.stderr)
			if p.code != 1 {
				t.Errorf("exit %d, want 1", p.code)
			}
			if !strings.Contains(p.stderr, c.want) {
				t.Errorf("stderr %q, want it to say %q", p.stderr, c.want)
			}
			if c.atLine && !strings.HasPrefix(p.stderr, c.name+".go:") {
				t.Errorf("stderr %q does not start at the script's line", p.stderr)
			}
			if goTrace.MatchString(p.stderr) {
				t.Errorf("stderr shows the Go trace: %q", p.stderr)
			}
			if got := snapshot(t, out); got != good {
				t.Errorf("the failed run changed the last good outputs:\n%s\nwas\n%s", got, good)
			}
		})
	}
}

// goTrace matches what the Go runtime prints when a program crashes.
var goTrace = regexp.MustCompile(`goroutine \d+ \[|runtime\.|\+0x[0-9a-f]+|yaegi|fatal error:`)

// snapshot is the names and contents of a folder's files, hidden ones included, but for the
// checkpoint (a failed run may keep one to be resumed).
func snapshot(t *testing.T, dir string) string {
	t.Helper()
	entries, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	var b strings.Builder
	for _, e := range entries {
		if e.Name() == "checkpoint.tally" {
			continue
		}
		data, _ := os.ReadFile(filepath.Join(dir, e.Name()))
		fmt.Fprintf(&b, "%s %d %x\n", e.Name(), len(data), data[:min(len(data), 64)])
	}
	return b.String()
}

// stuckScript finishes points 1 and 2 and hangs in its own block's loop on point 3 (or at
// once with hangFirst).
func stuckScript(hangAt float64) string {
	return fmt.Sprintf(`//go:build ignore

package main

import (
	"tally/blocks/channel"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/rng"
	"tally/blocks/source"
	"tally/runtime/sim"
)

func main() {
	x := sim.New("stuck")
	x.Sweep("ebn0_db", 1, 2, 3)
	x.Link(func(p sim.Point) *link.Link {
		m := modem.BPSK()
		hang := p.Get("ebn0_db") >= %g
		block := link.Func("hang", func(f *link.Frame, r *rng.Stream) {
			n := 0
			for hang {
				n++
			}
		})
		return link.Chain(source.Random(1024), m.Mod(), channel.AWGN(p.Get("ebn0_db")), m.Demod(), block)
	})
	x.Run()
}
`, hangAt)
}

// Ctrl-C on a block stuck in its own loop writes the points that finished and says so, naming
// the folder; with none finished it says that and writes nothing. Before, both exited 130 with
// "finished points written" and wrote nothing.
func TestInterruptIsHonest(t *testing.T) {
	if testing.Short() {
		t.Skip("starts processes")
	}
	bin := tallyBinary(t)
	for _, c := range []struct {
		hangAt float64
		points int
	}{{3, 2}, {1, 0}} {
		dir := t.TempDir()
		writeScript(t, dir, "stuck", stuckScript(c.hangAt))
		cmd := exec.Command(bin, "run", "-checkpoint", "0", "stuck.go")
		cmd.Dir = dir
		var stderr lockedBuffer
		cmd.Stderr = &stderr
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		// Wait until the run is in its stuck point: its finished points are reported.
		for deadline := time.Now().Add(20 * time.Second); time.Now().Before(deadline); time.Sleep(20 * time.Millisecond) {
			if strings.Count(stderr.String(), "stop=") >= c.points {
				break
			}
		}
		time.Sleep(time.Second) // into the stuck point
		cmd.Process.Signal(os.Interrupt)
		cmd.Wait()
		msg := stderr.String()
		if code := cmd.ProcessState.ExitCode(); code != 130 {
			t.Errorf("hang at %g: exit %d, want 130\n%s", c.hangAt, code, msg)
		}
		out := filepath.Join(dir, "stuck")
		if c.points == 0 {
			if !strings.Contains(msg, "no outputs written") {
				t.Errorf("nothing finished: %q, want it said that nothing was written", msg)
			}
			for _, f := range []string{"table.csv", "run.json", "README.md"} {
				if _, err := os.Stat(filepath.Join(out, f)); err == nil {
					t.Errorf("nothing finished, yet %s was written", f)
				}
			}
			if _, err := os.Stat(filepath.Join(out, "checkpoint.tally")); err == nil && !strings.Contains(msg, "-resume") {
				t.Errorf("a checkpoint was kept but %q does not say -resume continues it", msg)
			}
			continue
		}
		if !strings.Contains(msg, "interrupted: 2 finished point(s) written to stuck"+string(filepath.Separator)) {
			t.Errorf("stderr %q, want the 2 finished points and the folder named", msg)
		}
		if !strings.Contains(msg, "-resume") {
			t.Errorf("stderr %q does not say the checkpoint can be resumed", msg)
		}
		tab := table(t, out)
		if rows := strings.Count(tab, "\n") - 1; rows != 2 {
			t.Errorf("table.csv has %d rows, want the 2 finished points:\n%s", rows, tab)
		}
	}
}

// lockedBuffer is a bytes.Buffer safe to read while a process writes it.
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

// Files: a second run of a script whose folder is in use says who holds it; a failed run
// leaves no checkpoint it cannot be resumed from; stale temporary files of a killed writer are
// removed by the next run. Before, a second run shared the checkpoint silently, and both kinds
// of file stayed for ever.
func TestResultsFolderIsTidy(t *testing.T) {
	if testing.Short() {
		t.Skip("starts processes")
	}
	dir := t.TempDir()
	writeScript(t, dir, "slow", slowScript)
	out := filepath.Join(dir, "slow")
	release, err := isolate.Lock(out, ".lock")
	if err != nil {
		t.Fatal(err)
	}
	code, _, stderr := run("run", "-quiet", filepath.Join(dir, "slow.go"))
	release()
	if code != 1 || !strings.Contains(stderr, "in use by another tally run") || !strings.Contains(stderr, fmt.Sprintf("pid %d", os.Getpid())) {
		t.Errorf("run of a locked folder: exit %d, %q; want 1 and the holder's pid %d", code, stderr, os.Getpid())
	}

	// A killed writer's temporary files.
	os.MkdirAll(out, 0o755)
	stale := filepath.Join(out, ".table.csv.tmp-123456")
	os.WriteFile(stale, []byte("torn"), 0o644)
	// A run that fails at its third point, after two were saved in the checkpoint.
	failing := strings.Replace(slowScript, "p := pt.Get(\"p\")", "p := pt.Get(\"p\")\n\t\tif p == 0.01 {\n\t\t\tpanic(\"no link for this point\")\n\t\t}", 1)
	writeScript(t, dir, "slow", failing)
	code, _, stderr = run("run", "-quiet", "-workers", "1", "-checkpoint", "0", filepath.Join(dir, "slow.go"))
	if code != 1 || !strings.Contains(stderr, "no link for this point") {
		t.Fatalf("failing script: exit %d, %q", code, stderr)
	}
	if _, err := os.Stat(stale); err == nil {
		t.Errorf("the stale temporary file %s is still there", stale)
	}
	if _, err := os.Stat(filepath.Join(out, "checkpoint.tally")); err == nil {
		t.Errorf("a run failed by its script left checkpoint.tally (it cannot be resumed: the script must change)")
	}
	if left, _ := os.ReadDir(out); len(left) != 0 {
		t.Errorf("the failed run left files: %v", left)
	}
}

// -workers outside 1…4×cores (0: all cores) is a usage error; before, -workers -3 meant all
// cores and 100000 was accepted.
func TestWorkersBounded(t *testing.T) {
	for _, w := range []string{"-3", "100000"} {
		code, _, stderr := run("run", "-workers", w, "x.go")
		if code != 2 || !strings.Contains(stderr, "-workers "+w) {
			t.Errorf("-workers %s: exit %d, %q; want 2 naming the value", w, code, stderr)
		}
	}
}

// leakyScript starts a goroutine that touches marker every 10 ms for ever (it needs -trust for
// os), then runs a short experiment; with crash, the goroutine panics instead.
func leakyScript(marker string, crash bool) string {
	body := fmt.Sprintf(`for { os.WriteFile(%q, []byte("alive"), 0o644); time.Sleep(10 * time.Millisecond) }`, marker)
	if crash {
		body = `_ = os.Getpid; panic("the helper goroutine failed")` // os stays used: Go refuses an unused import
	}
	return fmt.Sprintf(`//go:build ignore

package main

import (
	"os"
	"time"

	"tally/blocks/channel"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/source"
	"tally/blocks/stop"
	"tally/runtime/sim"
)

func helper() { %s }

func main() {
	go helper()
	time.Sleep(50 * time.Millisecond)
	x := sim.New("leaky")
	x.Sweep("ebn0_db", 1, 2)
	x.Link(func(p sim.Point) *link.Link {
		m := modem.BPSK()
		return link.Chain(source.Random(1024), m.Mod(), channel.AWGN(p.Get("ebn0_db")), m.Demod())
	})
	x.Stop(stop.Bits(1e4))
	x.Run()
}
`, body)
}

// Under tally watch, goroutines a script starts end with its run, a script that crashes its
// process leaves the watcher up, and the next save runs. Before, the goroutines of every run
// kept running in the watcher (one more per save) and the crash ended the watcher.
func TestWatchOutlivesItsRuns(t *testing.T) {
	if testing.Short() {
		t.Skip("starts processes")
	}
	bin := tallyBinary(t)
	dir := t.TempDir()
	marker := filepath.Join(dir, "alive")
	exp := writeScript(t, dir, "leaky", leakyScript(marker, false))
	cmd := exec.Command(bin, "watch", "-trust", "-workers", "1", exp)
	var stdout, stderr lockedBuffer
	cmd.Stdout, cmd.Stderr = &stdout, &stderr
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	defer func() {
		cmd.Process.Signal(os.Interrupt)
		cmd.Wait()
	}()
	waitFor := func(what string, n int) {
		t.Helper()
		for deadline := time.Now().Add(60 * time.Second); strings.Count(stdout.String(), what) < n; time.Sleep(20 * time.Millisecond) {
			if time.Now().After(deadline) {
				t.Fatalf("no %q (%d) in time:\n%s\n%s", what, n, stdout.String(), stderr.String())
			}
		}
	}
	waitFor("points in", 1)
	time.Sleep(100 * time.Millisecond)
	os.Remove(marker)
	time.Sleep(300 * time.Millisecond)
	if _, err := os.Stat(marker); err == nil {
		t.Error("a goroutine of the finished run still runs")
	}

	writeScript(t, dir, "leaky", leakyScript(marker, true))
	waitFor("failed; the last good outputs are kept", 1)
	if !strings.Contains(stdout.String(), "a goroutine of the script panicked: the helper goroutine failed") {
		t.Errorf("the crash is not told:\n%s", stdout.String())
	}
	if goTrace.MatchString(stdout.String() + stderr.String()) {
		t.Errorf("the watcher shows a Go trace:\n%s\n%s", stdout.String(), stderr.String())
	}
	writeScript(t, dir, "leaky", leakyScript(marker, false)+"\n// saved again\n")
	waitFor("points in", 2)
	if cmd.ProcessState != nil {
		t.Errorf("the watcher ended: %v", cmd.ProcessState)
	}
}

// A frame size far beyond the machine is refused at the script's line, naming the block, the
// parameter, the value and the limit. Before, source.Random(1<<40) ended tally out of memory.
func TestHugeFrameRefused(t *testing.T) {
	dir := t.TempDir()
	src := strings.Replace(crashScript("huge", "", ""), "source.Random(1024)", "source.Random(1<<40)", 1)
	path := writeScript(t, dir, "huge", src)
	code, _, stderr := run("run", "-quiet", path)
	if code != 1 || !regexp.MustCompile(`huge\.go:\d+:\d+: source\.Random: n = 1099511627776 bits per frame is above the limit of 4194304`).MatchString(stderr) {
		t.Errorf("exit %d, %q; want 1 and the refusal at the script's line", code, stderr)
	}
}

// The child's stack cap leaves room for deep recursion a script may mean: 20 000 levels of an
// interpreted function (the figure the README gives) run, and the experiment after them too.
func TestDeepRecursionFits(t *testing.T) {
	if testing.Short() {
		t.Skip("starts processes")
	}
	dir := t.TempDir()
	src := strings.Replace(crashScript("deep", "func depth(n int) int {\n\tif n == 0 {\n\t\treturn 0\n\t}\n\treturn depth(n-1) + 1\n}", ""),
		"x := sim.New(", "if depth(20000) != 20000 {\n\t\tpanic(\"wrong depth\")\n\t}\n\tx := sim.New(", 1)
	src = strings.Replace(src, "stop.Bits(1e6)", "stop.Bits(1e4)", 1)
	code, _, stderr := run("run", "-quiet", writeScript(t, dir, "deep", src))
	if code != 0 {
		t.Errorf("20 000 levels of recursion: exit %d, %q", code, stderr)
	}
}
