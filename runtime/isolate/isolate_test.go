package isolate

import (
	"bytes"
	"encoding/gob"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"tally/runtime/internal/wire"
	"testing"
	"time"

	"tally/blocks/link"
	"tally/blocks/stop"
	"tally/runtime/framelog"
	"tally/runtime/host"
	"tally/runtime/progress"
	"tally/runtime/result"
)

// The crash reports below have the form the Go runtime prints (from memory of Go's
// runtime/panic.go and runtime/stack.go output, checked against this Go's own crashes by the
// end-to-end tests in cmd/tally); the goroutine panic is one captured from the interpreter.
var crashes = []struct {
	name, stderr, want string
	resumable          bool
}{
	{"stack", "runtime: goroutine stack exceeds 33554432-byte limit\nruntime: sp=0xc0200e0390 stack=[0xc0200e0000, 0xc0400e0000]\nfatal error: stack overflow\n\nruntime stack:\nruntime.throw({0x1, 0xe})\n",
		"the script exhausted the stack: endless recursion?", false},
	{"map", "fatal error: concurrent map writes\n\ngoroutine 35 [running]:\ninternal/runtime/maps.fatal({0x1, 0x15})\n",
		"one map from several goroutines at once (concurrent map writes)", true},
	{"oom", "fatal error: runtime: out of memory\n\nruntime stack:\nruntime.throw({0x1, 0x16})\n",
		"the script ran out of memory", true},
	{"goroutine", "panic: boom in goroutine [recovered, repanicked]\n\ngoroutine 22 [running]:\ngithub.com/traefik/yaegi/interp.runCfg.func1()\n\t/x/interp/run.go:226 +0x1ae\npanic({0x124b8a0?, 0xff5714a0960?})\n\t/x/runtime/panic.go:860 +0x13a\ngithub.com/traefik/yaegi/interp._panic.func1(0xff57124c420?)\n\t/x/interp/run.go:931 +0x46\n",
		"a goroutine of the script panicked: boom in goroutine (", false},
	{"interpreter", "panic: reflect: Call using float64 as type main.T [recovered]\n\ngoroutine 1 [running]:\nreflect.Value.call({0x1, 0x2, 0x13})\ngithub.com/traefik/yaegi/interp.genFunctionWrapper.func1.1()\n",
		"the interpreter failed on a construct of the script (reflect: Call using float64 as type main.T)", false},
	{"index", "panic: runtime error: index out of range [5] with length 3\n\ngoroutine 7 [running]:\ngithub.com/traefik/yaegi/interp.runCfg.func1()\n",
		"a goroutine of the script failed: runtime error: index out of range [5] with length 3", false},
}

func TestCrashMessages(t *testing.T) {
	for _, c := range crashes {
		msg, resumable := crashMessage([]byte(c.stderr), errors.New("exit status 2"))
		if !strings.Contains(msg, c.want) || resumable != c.resumable {
			t.Errorf("%s: %q (resumable %v), want %q (resumable %v)", c.name, msg, resumable, c.want, c.resumable)
		}
		for _, trace := range []string{"goroutine 2", "runtime.", "+0x", "yaegi", "[recovered"} {
			if strings.Contains(msg, trace) {
				t.Errorf("%s: the message shows the trace (%q): %q", c.name, trace, msg)
			}
		}
	}
}

// Sizes in IEC binary units (KiB = 2^10 …, IEC 80000-13) and SI decimal ones (KB = 10^3 …).
func TestParseSize(t *testing.T) {
	for in, want := range map[string]int64{
		"4GiB": 4 << 30, "512MiB": 512 << 20, "1.5G": 3 << 29, "2GB": 2e9, "100000000": 1e8, "1tib": 1 << 40, " 64 MiB ": 64 << 20,
	} {
		if got, err := ParseSize(in); err != nil || got != want {
			t.Errorf("ParseSize(%q) = %d, %v; want %d", in, got, err, want)
		}
	}
	for _, in := range []string{"", "GiB", "-1GiB", "0", "4 parsecs", "1MiB", "1e30"} {
		if _, err := ParseSize(in); err == nil {
			t.Errorf("ParseSize(%q) accepted", in)
		}
	}
	for n, want := range map[int64]string{4 << 30: "4GiB", 3 << 29: "1.5GiB", 512 << 20: "512MiB", 1000: "1000B"} {
		if got := Size(n); got != want {
			t.Errorf("Size(%d) = %q, want %q", n, got, want)
		}
	}
	if d := DefaultMemory(); d < 64<<20 {
		t.Errorf("default memory limit %s is below the 64MiB a run needs", Size(d))
	}
}

// One run per folder: a second lock says who holds the first, and the folder is free again
// once released; a folder made only for the lock goes with it.
func TestLock(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "exp")
	release, err := Lock(dir, ".lock")
	if err != nil {
		t.Fatal(err)
	}
	_, err = Lock(dir, ".lock")
	var busy *Busy
	if !errors.As(err, &busy) || busy.Holder.PID != os.Getpid() || !strings.Contains(err.Error(), fmt.Sprintf("pid %d", os.Getpid())) {
		t.Errorf("second lock: %v, want Busy naming pid %d", err, os.Getpid())
	}
	other, err := Lock(dir, ".lock-shard-1-of-2")
	if err != nil {
		t.Errorf("a shard's lock is refused while the folder's is held: %v", err)
	} else {
		other()
	}
	release()
	if _, err := os.Stat(dir); err == nil {
		t.Error("the folder made for the lock is left behind empty")
	}
	again, err := Lock(dir, ".lock")
	if err != nil {
		t.Fatalf("lock after release: %v", err)
	}
	again()
}

// Temporary files a killed writer left are removed; other files stay.
func TestCleanTemps(t *testing.T) {
	dir := t.TempDir()
	for _, n := range []string{".table.csv.tmp-1", ".run.json.tmp-22", "table.csv", ".keep"} {
		os.WriteFile(filepath.Join(dir, n), nil, 0o644)
	}
	cleanTemps(dir, nil)
	left, _ := os.ReadDir(dir)
	var names []string
	for _, e := range left {
		names = append(names, e.Name())
	}
	if strings.Join(names, " ") != ".keep table.csv" {
		t.Errorf("left %v, want .keep and table.csv", names)
	}
}

// The pipe carries what JSON cannot: ±Inf and NaN figures (an open interval end) and the
// constellation samples run.json leaves out.
func TestReportCarriesEveryValue(t *testing.T) {
	in := report{Kind: kindDone, Run: &result.Run{Name: "r", Points: []result.Point{{Values: []float64{math.Inf(-1)},
		Taps: []result.Tap{{Rate: math.NaN(), High: math.Inf(1)}}}},
		Targets: []result.Target{{High: math.Inf(1), Low: math.NaN()}},
		Scatter: &result.Scatter{Received: []complex128{complex(1, -1)}}}}
	var b bytes.Buffer
	if err := gob.NewEncoder(&b).Encode(in); err != nil {
		t.Fatal(err)
	}
	var out report
	if err := gob.NewDecoder(&b).Decode(&out); err != nil {
		t.Fatal(err)
	}
	p, tg := out.Run.Points[0], out.Run.Targets[0]
	if !math.IsInf(p.Values[0], -1) || !math.IsNaN(p.Taps[0].Rate) || !math.IsInf(p.Taps[0].High, 1) ||
		!math.IsInf(tg.High, 1) || !math.IsNaN(tg.Low) || out.Run.Scatter == nil || out.Run.Scatter.Received[0] != complex(1, -1) {
		t.Errorf("decoded %+v, want the infinities, NaNs and samples sent", out.Run)
	}
}

// A progress message carries what the parent's OnProgress reads: the point, the prefix, and
// the rules its goal and time left come from (progress.Goals, progress.Left), through gob.
func TestProgressMessage(t *testing.T) {
	rules := []stop.Rule{stop.Errors(100), stop.Bits(1e7), stop.Time(time.Minute), stop.Errors(20).Tap(link.TapFER)}
	p := progress.Point{Label: "ebn0_db=4", Index: 2, Total: 6, Rules: rules, Confidence: 0.99, Method: "wilson", Tap: link.TapFER}
	pr := &stop.Progress{Frames: 12, Taps: []string{link.TapBER, link.TapFER},
		Counts: []link.Tally{{Trials: 6144, Errors: 57, Frames: 12}, {Trials: 12, Errors: 9, Frames: 12}}, Elapsed: 1500 * time.Millisecond}
	var buf bytes.Buffer
	if err := gob.NewEncoder(&buf).Encode(report{Kind: kindLive, Live: liveOf(p, pr)}); err != nil {
		t.Fatal(err)
	}
	var out report
	if err := gob.NewDecoder(&buf).Decode(&out); err != nil {
		t.Fatal(err)
	}
	got, gpr := out.Live.Point(), out.Live.Prefix
	if got.Label != p.Label || got.Index != p.Index || got.Total != p.Total || got.Confidence != p.Confidence || got.Method != p.Method || got.Tap != p.Tap {
		t.Errorf("point %+v, sent %+v", got, p)
	}
	if fmt.Sprint(gpr) != fmt.Sprint(*pr) {
		t.Errorf("prefix %+v, sent %+v", gpr, *pr)
	}
	e0, b0 := progress.Goals(rules)
	e1, b1 := progress.Goals(got.Rules)
	l0, ok0 := progress.Left(rules, pr)
	l1, ok1 := progress.Left(got.Rules, &gpr)
	if e0 != e1 || b0 != b1 || l0 != l1 || ok0 != ok1 || !ok1 {
		t.Errorf("goals %d/%d, time left %v %v; sent %d/%d, %v %v", e1, b1, l1, ok1, e0, b0, l0, ok0)
	}
	if progress.Live(got, &gpr) != progress.Live(p, pr) || !strings.Contains(progress.Live(got, &gpr), "fer errors 9/20") {
		t.Errorf("live line %q, in process %q", progress.Live(got, &gpr), progress.Live(p, pr))
	}
}

// The finished run brings the per-frame counts and fingerprints of its points through the
// pipe (the parent writes frames.gz from them); point messages leave the counts out. The job
// carries tally watch's permission to reuse frames.
func TestReportCarriesFrames(t *testing.T) {
	l := framelog.New(2)
	l.Add([]link.Tally{{Trials: 64, Errors: 3}, {Trials: 1, Errors: 1}})
	l.Add([]link.Tally{{Trials: 64}, {Trials: 1}})
	run := &result.Run{Points: []result.Point{{Frames: 2, LinkFingerprint: "fp", FramesReused: 1, Log: l}}}
	var b bytes.Buffer
	if err := gob.NewEncoder(&b).Encode(report{Kind: kindDone, Run: run}); err != nil {
		t.Fatal(err)
	}
	var out report
	if err := gob.NewDecoder(&b).Decode(&out); err != nil {
		t.Fatal(err)
	}
	p := out.Run.Points[0]
	if p.LinkFingerprint != "fp" || p.FramesReused != 1 || p.Log == nil || !reflect.DeepEqual(p.Log.Runs, l.Runs) || p.Log.Frames != 2 {
		t.Errorf("decoded %+v, want the point as sent", p)
	}
	if w := wire.WithoutLogs(run); w.Points[0].Log != nil || run.Points[0].Log == nil {
		t.Error("withoutLogs kept the counts, or took them from the run itself")
	}
	if j := newJob("x.go", host.Config{Reuse: true}, 0); !config(j).Reuse || j.Build != host.BuildIdentity() {
		t.Error("the job dropped Reuse or the build identity")
	}
}
