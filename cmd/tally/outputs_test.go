package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// openScript is BPSK over AWGN from 0 to 4 dB with two targets: 1e-9, which no point reaches
// (outside the sweep), and 0.0135, which the estimates cross between 3 and 4 dB while the
// upper limit at 4 dB (the last point) stays above it, so the crossing's interval is open
// above. The second used to fail the whole run at its end with "json: unsupported value:
// +Inf", writing nothing.
const openScript = `//go:build ignore

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

func main() {
	x := sim.New("open ends")
	x.Sweep("ebn0_db", sim.Range(0, 4, 1)...)
	x.Link(func(p sim.Point) *link.Link {
		m := modem.BPSK()
		return link.Chain(source.Random(1024), m.Mod(), channel.AWGN(p.Get("ebn0_db")), m.Demod())
	})
	x.Stop(stop.Errors(100), stop.Bits(1e6))
	x.Theory("coherent", func(p sim.Point) float64 { return theory.BPSK(p.Get("ebn0_db")) })
	x.Target(1e-9, "coherent")
	x.Target(0.0135, "coherent")
	x.Run()
}
`

// A finished run with targets outside the sweep and open at one end writes all its outputs:
// the open end null in run.json with a word why, "open" in README.md; -resume of the same
// script then runs and writes the same table.
func TestOpenTargetWritesOutputs(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "open.go")
	if err := os.WriteFile(path, []byte(openScript), 0o644); err != nil {
		t.Fatal(err)
	}
	code, _, stderr := run("run", "-quiet", "-workers", "2", path)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	out := filepath.Join(dir, "open")
	first := table(t, out)
	for _, f := range []string{"table.csv", "run.json", "README.md", "ber.svg", "ber.png"} {
		if _, err := os.Stat(filepath.Join(out, f)); err != nil {
			t.Errorf("%s not written: %v", f, err)
		}
	}
	b, err := os.ReadFile(filepath.Join(out, "run.json"))
	if err != nil {
		t.Fatal(err)
	}
	var rec struct {
		Targets []struct {
			Rate  float64  `json:"target"`
			Found bool     `json:"found"`
			High  *float64 `json:"x_high"`
			Open  string   `json:"open"`
			Note  string   `json:"note"`
		} `json:"targets"`
	}
	if err := json.Unmarshal(b, &rec); err != nil {
		t.Fatal(err)
	}
	if len(rec.Targets) != 2 {
		t.Fatalf("%d targets in run.json, want 2", len(rec.Targets))
	}
	if tr := rec.Targets[0]; tr.Found || tr.Note == "" {
		t.Errorf("target 1e-9 outside the sweep: %+v, want not found with a note", tr)
	}
	if tr := rec.Targets[1]; !tr.Found || tr.High != nil || !strings.Contains(tr.Open, "beyond the last point") {
		t.Errorf("target 0.0135: %+v, want found, x_high null and a word why", tr)
	}
	readme, _ := os.ReadFile(filepath.Join(out, "README.md"))
	if !strings.Contains(string(readme), `, open\]`) {
		t.Errorf("README.md does not show the open end:\n%s", readme)
	}
	code, _, stderr = run("run", "-quiet", "-resume", path)
	if code != 0 {
		t.Fatalf("-resume: exit %d: %s", code, stderr)
	}
	if again := table(t, out); again != first {
		t.Errorf("-resume wrote another table:\n%s\nwant\n%s", again, first)
	}
}
