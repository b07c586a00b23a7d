package host

import (
	"bytes"
	"context"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// typedScript writes a script on the typed surface with body as its main function's body.
func typedScript(t *testing.T, body string) string {
	t.Helper()
	src := `//go:build ignore

package main

import (
	"tally/blocks/channel"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/source"
	"tally/blocks/stop"
	"tally/blocks/theory"
	"tally/runtime/sim"
)

var _, _ = theory.BPSK, stop.Bits

func bpsk(ebn0 *sim.Axis) func(p sim.Point) *link.Link {
	return func(p sim.Point) *link.Link {
		m := modem.BPSK()
		return link.Chain(source.Random(512), m.Mod(), channel.AWGN(ebn0.At(p)), m.Demod())
	}
}

func main() {
` + body + `
}
`
	p := filepath.Join(t.TempDir(), "typed.go")
	if err := os.WriteFile(p, []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// A misspelt handle is a compile-time error, reported at its line as Go reports it, before
// anything runs; the old surface found a misspelt parameter name only when the link was built.
func TestTypedSurfaceMistakesAtTheirLine(t *testing.T) {
	for _, c := range []struct {
		name, body, want string
	}{
		{"misspelt axis", `	x := sim.New("t")
	ebn0 := x.Axis("ebn0_db", 0, 2)
	x.Curve("BPSK", func(p sim.Point) *link.Link {
		m := modem.BPSK()
		return link.Chain(source.Random(512), m.Mod(), channel.AWGN(ebno.At(p)), m.Demod())
	})
	_ = ebn0
	x.Run()`, "typed.go:29:63: undefined: ebno"},
		{"theory of the wrong type", `	x := sim.New("t")
	ebn0 := x.Axis("ebn0_db", 0, 2)
	x.Curve("BPSK", bpsk(ebn0)).Theory(theory.PSK)
	x.Run()`, "typed.go:27:37: cannot use theory.PSK"},
		{"curve twice", `	x := sim.New("t")
	ebn0 := x.Axis("ebn0_db", 0, 2)
	x.Curve("BPSK", bpsk(ebn0))
	x.Curve("BPSK", func(p sim.Point) *link.Link { return nil })
	x.Run()`, `typed.go:28:2: sim.Curve: the curve "BPSK" is declared twice`},
		{"curves and a link", `	x := sim.New("t")
	ebn0 := x.Axis("ebn0_db", 0, 2)
	x.Link(bpsk(ebn0))
	x.Curve("BPSK", func(p sim.Point) *link.Link { return nil })
	x.Run()`, "typed.go:28:2: sim.Curve: the experiment already has a Link for every point"},
		{"theory and limit mixed", `	x := sim.New("t")
	ebn0 := x.Axis("ebn0_db", 0, 2)
	x.Curve("a", bpsk(ebn0)).Theory(theory.BPSK)
	x.Curve("b", bpsk(ebn0)).Limit(link.TapFER, theory.BPSK)
	x.Run()`, "typed.go:29:2: sim.Curve: some curves have a Theory and others a Limit"},
		{"limit without a function", `	x := sim.New("t")
	ebn0 := x.Axis("ebn0_db", 0, 2)
	x.Curve("b", func(p sim.Point) *link.Link { return bpsk(ebn0)(p) }).Limit(link.TapFER, nil)
	x.Run()`, `typed.go:27:2: sim.Curve("b").Limit: the function is nil`},
		{"variants named as no column can be", `	x := sim.New("t")
	x.Axis("ebn0_db", 0, 2)
	x.Variants("front end", "plain", "clipped")
	x.Run()`, `typed.go:27:2: sim.Variants: parameter name "front end" must be letters, digits and _`},
		{"legend swept twice", `	x := sim.New("t")
	ebn0 := x.Axis("ebn0_db", 0, 2)
	x.Choices("modem", "a")
	x.Legend("modem")
	x.Curve("a", bpsk(ebn0))
	x.Run()`, `typed.go:28:2: sim.Legend: "modem" is already a swept parameter`},
	} {
		t.Run(c.name, func(t *testing.T) {
			p := typedScript(t, c.body)
			err := Run(context.Background(), p, quiet(1))
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Fatalf("got %v\nwant an error containing %q", err, c.want)
			}
			if _, serr := os.Stat(filepath.Join(strings.TrimSuffix(p, ".go"), "table.csv")); serr == nil {
				t.Errorf("a failed script wrote a table")
			}
		})
	}
}

// Curves declared before the axis still put the axis first; a curve without a theory has an
// empty cell in the theory column; the table is the same bytes interpreted and compiled.
func TestTypedSurfaceRunsAndCompiles(t *testing.T) {
	p := typedScript(t, `	x := sim.New("t")
	x.Legend("modem")
	x.Curve("BPSK", func(p sim.Point) *link.Link { return bpsk(ebn0)(p) }).Theory(theory.BPSK)
	x.Curve("QPSK", func(p sim.Point) *link.Link {
		m := modem.QPSK()
		return link.Chain(source.Random(512), m.Mod(), channel.AWGN(ebn0.At(p)), m.Demod())
	})
	x.Stop(stop.Bits(2048))
	x.Target(0.05)
	x.Run()`)
	src, _ := os.ReadFile(p)
	// The axis is declared after the curves that read it: a package-level handle.
	s := strings.Replace(string(src), "func main() {\n", "var ebn0 *sim.Axis\n\nfunc main() {\n", 1)
	s = strings.Replace(s, "\tx.Stop(", "\tebn0 = x.Axis(\"ebn0_db\", 0, 2, 4)\n\tx.Stop(", 1)
	os.WriteFile(p, []byte(s), 0o644)
	if err := Run(context.Background(), p, quiet(2)); err != nil {
		t.Fatal(err)
	}
	want := table(t, p)
	lines := strings.Split(strings.TrimSpace(string(want)), "\n")
	if !strings.HasPrefix(lines[0], "ebn0_db,modem,") || !strings.HasSuffix(lines[0], ",theory_theory") || len(lines) != 7 {
		t.Fatalf("table:\n%s", want)
	}
	for _, l := range lines[1:] {
		qpsk := strings.Contains(l, ",QPSK,")
		if empty := strings.HasSuffix(l, ","); empty != qpsk {
			t.Errorf("row %q: the theory cell should be empty for QPSK only", l)
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

// A frame length the blocks cannot take whole is rounded up, said once in the progress output
// and kept in the summary's notes; .Exact() keeps it, and the modulator then refuses it with
// its own message. QPSK takes 2 bits a symbol: 1001 bits become 1002 (common practice, no
// source).
func TestFrameRoundedAndSaidOnce(t *testing.T) {
	body := `	x := sim.New("t")
	ebn0 := x.Axis("ebn0_db", 0, 2, 4)
	x.Curve("QPSK", func(p sim.Point) *link.Link {
		m := modem.QPSK()
		return link.Chain(source.Random(1001), m.Mod(), channel.AWGN(ebn0.At(p)), m.Demod())
	})
	x.Stop(stop.Bits(2000))
	x.Run()`
	p := typedScript(t, body)
	var log bytes.Buffer
	if err := Run(context.Background(), p, Config{Workers: 2, Log: &log}); err != nil {
		t.Fatal(err)
	}
	const said = "curve=QPSK: frames rounded up from 1001 to 1002 source bits so that every block takes whole units (modem.QPSK.Mod takes 2 bits at a time)"
	if n := strings.Count(log.String(), said); n != 1 {
		t.Errorf("the rounding is said %d times in the progress output, want once:\n%s", n, log.String())
	}
	sum, err := os.ReadFile(filepath.Join(strings.TrimSuffix(p, ".go"), "README.md"))
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(sum), "frames rounded up from 1001 to 1002") {
		t.Errorf("README.md does not say the frames were rounded:\n%s", sum)
	}
	if tab := string(table(t, p)); !strings.Contains(tab, "\n0,QPSK,2004,") {
		t.Errorf("want 2 frames of 1002 bits at 0 dB:\n%s", tab)
	}
	p = typedScript(t, strings.Replace(body, "source.Random(1001)", "source.Random(1001).Exact()", 1))
	err = Run(context.Background(), p, quiet(1))
	if err == nil || !strings.Contains(err.Error(), "1001 coded bits do not fill whole 2-bit symbols") {
		t.Errorf("Exact: %v", err)
	}
}

// A panic the interpreter places at a column is reported at the script's own column, not at
// the column of the instrumented text (which has a marker before every statement).
func TestPanicColumnIsTheScripts(t *testing.T) {
	src := `//go:build ignore

package main

import "tally/runtime/sim"

type T struct{ n int }

func main() {
	x := sim.New("t")
	_ = x
	var v any = 3
	t := v.(*T)
	_ = t
}
`
	p := filepath.Join(t.TempDir(), "col.go")
	if err := os.WriteFile(p, []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	err := Run(context.Background(), p, quiet(1))
	if err == nil || !strings.Contains(err.Error(), "col.go:13:") || !strings.Contains(err.Error(), "interface conversion") {
		t.Fatalf("got %v; want the interface conversion at col.go:13", err)
	}
	// v.(*T) begins at column 7 of the line (common practice: columns count bytes from 1).
	if !strings.Contains(err.Error(), "col.go:13:7:") {
		t.Errorf("got %v; want col.go:13:7", err)
	}
}
