package host

import (
	"bytes"
	"context"
	"errors"
	"image/png"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"sync"
	"testing"
	"time"
)

// scriptIn copies a test script into a fresh folder, so its outputs land there.
func scriptIn(t *testing.T, name string) string {
	t.Helper()
	src, err := os.ReadFile(filepath.Join("testdata", name))
	if err != nil {
		t.Fatal(err)
	}
	p := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(p, src, 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

func table(t *testing.T, script string) []byte {
	t.Helper()
	b, err := os.ReadFile(filepath.Join(strings.TrimSuffix(script, ".go"), "table.csv"))
	if err != nil {
		t.Fatal(err)
	}
	return b
}

func quiet(workers int) Config { return Config{Workers: workers, Quiet: true} }

// The engine contract: the table is the same bytes for any number of workers, and for the
// interpreted and the compiled (go run) script.
func TestTableSameForWorkersAndCompiled(t *testing.T) {
	p := scriptIn(t, "custom.go")
	var want []byte
	for _, w := range []int{1, 2, 7} {
		if err := Run(context.Background(), p, quiet(w)); err != nil {
			t.Fatalf("workers %d: %v", w, err)
		}
		got := table(t, p)
		if want == nil {
			want = got
			continue
		}
		if !bytes.Equal(got, want) {
			t.Fatalf("workers %d: table differs\n%s\nvs\n%s", w, got, want)
		}
	}
	if testing.Short() {
		return
	}
	root, _ := filepath.Abs(filepath.Join("..", ".."))
	cmd := exec.Command("go", "run", p, "-workers", "3", "-quiet")
	cmd.Dir = root
	if out, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("go run: %v\n%s", err, out)
	}
	if got := table(t, p); !bytes.Equal(got, want) {
		t.Fatalf("compiled table differs from interpreted\n%s\nvs\n%s", got, want)
	}
}

// A broken script reports file:line:col pointing into the script and leaves the last good
// outputs as they were.
func TestScriptErrorsPointAtScriptAndKeepOutputs(t *testing.T) {
	p := scriptIn(t, "custom.go")
	if err := Run(context.Background(), p, quiet(2)); err != nil {
		t.Fatal(err)
	}
	good := table(t, p)
	goodSrc, _ := os.ReadFile(p)
	cases := []struct {
		name, from, to, pos, msg string
	}{
		{"syntax", `x.Sweep("ebn0_db", 0, 2, 4, 6)`, `x.Sweep("ebn0_db", 0, 2 4, 6)`, `:17:\d+$`, "syntax error: unexpected literal 4 in argument list; possibly missing comma or )"},
		{"type", `x.Sweep("ebn0_db", 0, 2, 4, 6)`, `x.Sweep("ebn0_db", "0")`, `:17:\d+$`, "cannot use \"0\" (untyped string constant) as float64 value in argument to x.Sweep"},
		{"panic", `x.Sweep("ebn0_db", 0, 2, 4, 6)`, "var z []int\n\t_ = z[5]", `:18:2$`, "out of range"},
		{"bad parameter", `x.Stop(stop.Errors(200), stop.Bits(1e6))`, `x.Stop(stop.Errors(0), stop.Bits(1e6))`, `:\d+:2$`, "stop.Errors: count 0"},
		{"unknown parameter", `p.Get("ebn0_db")), dem)`, `p.Get("snr")), dem)`, `:\d+:3$`, `no swept parameter "snr"`},
		{"block panic", `hard[i] = 1`, `hard[i+len(hard)] = 1`, `:\d+:\d+$`, "panic"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			src := strings.Replace(string(goodSrc), c.from, c.to, 1)
			if src == string(goodSrc) {
				t.Fatalf("test case does not change the script")
			}
			os.WriteFile(p, []byte(src), 0o644)
			err := Run(context.Background(), p, quiet(2))
			var se *ScriptError
			if !errors.As(err, &se) {
				t.Fatalf("want a ScriptError, got %v", err)
			}
			if !strings.HasPrefix(se.Pos, p+":") || !regexp.MustCompile(c.pos).MatchString(se.Pos) {
				t.Errorf("position %q, want %s:…%s", se.Pos, p, c.pos)
			}
			if !strings.Contains(se.Msg, c.msg) {
				t.Errorf("message %q lacks %q", se.Msg, c.msg)
			}
			if !bytes.Equal(table(t, p), good) {
				t.Errorf("a failed run changed table.csv")
			}
		})
	}
}

// Each import outside the sandbox is refused with its name and the way to lift it.
func TestSandboxRefusesImports(t *testing.T) {
	for _, pkg := range []string{"os", "os/exec", "net", "net/http", "syscall", "unsafe", "reflect", "plugin", "io/ioutil", "math/rand"} {
		p := filepath.Join(t.TempDir(), "s.go")
		src := "//go:build ignore\n\npackage main\n\nimport _ \"" + pkg + "\"\n\nfunc main() {}\n"
		os.WriteFile(p, []byte(src), 0o644)
		err := Run(context.Background(), p, quiet(1))
		if err == nil || !strings.Contains(err.Error(), `"`+pkg+`"`) || !strings.Contains(err.Error(), TrustFlag) || !strings.Contains(err.Error(), p+":5:10") {
			t.Errorf("import %s: got %v", pkg, err)
		}
	}
}

// With the sandbox lifted the same imports load.
func TestTrustLiftsSandbox(t *testing.T) {
	p := scriptIn(t, "custom.go")
	src, _ := os.ReadFile(p)
	s := strings.Replace(string(src), "import (", "import (\n\t\"os\"", 1)
	s = strings.Replace(s, `x := sim.New("custom blocks")`, `x := sim.New("custom blocks " + os.Getenv("NO_SUCH_VARIABLE_HERE"))`, 1)
	os.WriteFile(p, []byte(s), 0o644)
	if err := Run(context.Background(), p, quiet(1)); err == nil {
		t.Fatal("sandboxed run accepted os")
	}
	c := quiet(1)
	c.Trust = true
	if err := Run(context.Background(), p, c); err != nil {
		t.Fatalf("trusted run: %v", err)
	}
}

// A multiple assignment the interpreter would run wrongly is refused, not run.
func TestRefusesMisrunAssignment(t *testing.T) {
	p := filepath.Join(t.TempDir(), "a.go")
	os.WriteFile(p, []byte("//go:build ignore\n\npackage main\n\nfunc main() {\n\ts := []int{1}\n\ta, b := 0, 0\n\ta, b = 1, len(s)\n\t_, _ = a, b\n}\n"), 0o644)
	err := Run(context.Background(), p, quiet(1))
	if err == nil || !strings.Contains(err.Error(), p+":8:2") {
		t.Fatalf("got %v", err)
	}
}

// Ctrl-C (the context ending) stops a run promptly, keeps the finished points and writes the
// point in progress with stop "interrupted".
func TestInterruptKeepsFinishedPoints(t *testing.T) {
	p := scriptIn(t, "custom.go")
	src, _ := os.ReadFile(p)
	// A last point that would run for minutes: a high Eb/N0 and a huge error target.
	s := strings.Replace(string(src), `x.Sweep("ebn0_db", 0, 2, 4, 6)`, `x.Sweep("ebn0_db", 0, 2, 14)`, 1)
	s = strings.Replace(s, `x.Stop(stop.Errors(200), stop.Bits(1e6))`, `x.Stop(stop.Errors(200), stop.Bits(1e12))`, 1)
	os.WriteFile(p, []byte(s), 0o644)
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	// Cancel once the first two points are reported finished, then a moment into the third.
	log := &lineWatch{after: 2, do: func() { time.AfterFunc(200*time.Millisecond, cancel) }}
	err := Run(ctx, p, Config{Workers: 2, Log: log})
	begin := log.at // when the cancel was set off
	if !errors.Is(err, ErrInterrupted) {
		t.Fatalf("want ErrInterrupted, got %v", err)
	}
	if d := time.Since(begin); d > 10*time.Second {
		t.Errorf("the run took %v to stop", d)
	}
	rows := strings.Split(strings.TrimSpace(string(table(t, p))), "\n")
	if len(rows) != 4 {
		t.Fatalf("table has %d rows, want header and 3 points:\n%s", len(rows), strings.Join(rows, "\n"))
	}
	for i, want := range []string{"errors", "errors", "interrupted"} {
		if !strings.Contains(rows[i+1], ","+want+",") {
			t.Errorf("point %d: %q, want stop %s", i+1, rows[i+1], want)
		}
	}
}

// lineWatch is a log writer that calls do once it has seen after lines with "stop=".
type lineWatch struct {
	mu    sync.Mutex
	seen  int
	after int
	do    func()
	at    time.Time
}

func (w *lineWatch) Write(b []byte) (int, error) {
	w.mu.Lock()
	defer w.mu.Unlock()
	w.seen += strings.Count(string(b), "stop=")
	if w.do != nil && w.seen >= w.after {
		w.do()
		w.do = nil
		w.at = time.Now()
	}
	return len(b), nil
}

// A script stuck in its own loop is stopped too, a grace period after the run is ended.
func TestInterruptStopsStuckScript(t *testing.T) {
	p := filepath.Join(t.TempDir(), "stuck.go")
	os.WriteFile(p, []byte("//go:build ignore\n\npackage main\n\nfunc main() {\n\tn := 0\n\tfor {\n\t\tn++\n\t}\n}\n"), 0o644)
	ctx, cancel := context.WithTimeout(context.Background(), 200*time.Millisecond)
	defer cancel()
	begin := time.Now()
	err := Run(ctx, p, quiet(1))
	if !errors.Is(err, ErrInterrupted) {
		t.Fatalf("want ErrInterrupted, got %v", err)
	}
	if d := time.Since(begin); d > stuckGrace+5*time.Second {
		t.Errorf("stopping took %v", d)
	}
}

// Scatter draws one frame of the chosen point as the receiver saw it.
func TestScatterWritesConstellation(t *testing.T) {
	p := scriptIn(t, "bpsk.go")
	src, _ := os.ReadFile(p)
	os.WriteFile(p, []byte(strings.Replace(string(src), "\tx.Run()", "\tx.Scatter(4)\n\tx.Run()", 1)), 0o644)
	if err := Run(context.Background(), p, quiet(2)); err != nil {
		t.Fatal(err)
	}
	f, err := os.Open(filepath.Join(strings.TrimSuffix(p, ".go"), "scatter.png"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	if _, err := png.Decode(f); err != nil {
		t.Fatalf("scatter.png: %v", err)
	}
	os.WriteFile(p, []byte(strings.Replace(string(src), "\tx.Run()", "\tx.Scatter(5)\n\tx.Run()", 1)), 0o644)
	if err := Run(context.Background(), p, quiet(2)); err == nil || !strings.Contains(err.Error(), "no point") {
		t.Fatalf("a point not in the sweep: %v", err)
	}
}

// A paired comparison keeps the engine contract: the table, its comparison columns
// included, is the same bytes for any number of workers, interpreted and compiled.
func TestPairedTableSameForWorkersAndCompiled(t *testing.T) {
	p := scriptIn(t, "paired.go")
	var want []byte
	for _, w := range []int{1, 2, 5} {
		if err := Run(context.Background(), p, quiet(w)); err != nil {
			t.Fatalf("workers %d: %v", w, err)
		}
		got := table(t, p)
		if want == nil {
			want = got
			if !bytes.Contains(got, []byte(",diff,diff_low,diff_high,ratio,ratio_low,ratio_high,diff_p")) {
				t.Fatalf("no comparison columns:\n%s", got)
			}
			continue
		}
		if !bytes.Equal(got, want) {
			t.Fatalf("workers %d: table differs\n%s\nvs\n%s", w, got, want)
		}
	}
	if testing.Short() {
		return
	}
	root, _ := filepath.Abs(filepath.Join("..", ".."))
	cmd := exec.Command("go", "run", p, "-workers", "3", "-quiet")
	cmd.Dir = root
	if out, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("go run: %v\n%s", err, out)
	}
	if got := table(t, p); !bytes.Equal(got, want) {
		t.Fatalf("compiled table differs from interpreted\n%s\nvs\n%s", got, want)
	}
}
