package main

import (
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// tally run ends by saying where the outputs went and where the curve crosses its target, in
// README.md's words; -quiet says nothing. BPSK over AWGN crosses BER 0.03 where
// ½·erfc(√(Eb/N0)) = 0.03, at about 2.49 dB (Proakis, Digital Communications, 4th ed., 2001,
// eq. 5.2-5; solved here with the standard library's math.Erfc): the simulated crossing from
// 100-error points lies within 0.5 dB of it.
func TestRunEndsWithOutputsAndCrossings(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "ends.go")
	src := strings.Replace(openScript, "\tx.Target(1e-9, \"coherent\")\n\tx.Target(0.0135, \"coherent\")\n", "\tx.Target(0.03, \"coherent\")\n", 1)
	if src == openScript {
		t.Fatal("the script is not changed")
	}
	if err := os.WriteFile(path, []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	code, _, stderr := run("run", "-workers", "2", path)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	lines := strings.Split(strings.TrimSpace(stderr), "\n")
	if len(lines) < 2 {
		t.Fatalf("too little said:\n%s", stderr)
	}
	where, crossing := lines[len(lines)-2], strings.TrimSpace(lines[len(lines)-1])
	if want := regexp.MustCompile(`^` + regexp.QuoteMeta(path) + `: 5 points in .+ → ` + regexp.QuoteMeta(filepath.Join(dir, "ends")+string(filepath.Separator)) + `$`); !want.MatchString(where) {
		t.Errorf("outputs line %q", where)
	}
	readme, _ := os.ReadFile(filepath.Join(dir, "ends", "README.md"))
	// README.md escapes what Markdown would read as markup; the terminal line is plain text.
	shown := strings.NewReplacer(`\[`, "[", `\]`, "]", `\|`, "|", `\*`, "*").Replace(string(readme))
	if !strings.Contains(shown, crossing) {
		t.Errorf("crossing %q is not README.md's:\n%s", crossing, readme)
	}
	m := regexp.MustCompile(`^ber = 0\.03 at ebn0_db = ([0-9.]+), interval`).FindStringSubmatch(crossing)
	if m == nil {
		t.Fatalf("crossing line %q", crossing)
	}
	x, _ := strconv.ParseFloat(m[1], 64)
	lo, hi := 0.0, 10.0 // ½·erfc(√(10^(dB/10))) = 0.03 by bisection
	for range 60 {
		mid := (lo + hi) / 2
		if 0.5*math.Erfc(math.Sqrt(math.Pow(10, mid/10))) > 0.03 {
			lo = mid
		} else {
			hi = mid
		}
	}
	if math.Abs(x-lo) > 0.5 {
		t.Errorf("crossing at %.2f dB, theory %.2f dB", x, lo)
	}
	code, _, stderr = run("run", "-quiet", path)
	if code != 0 || stderr != "" {
		t.Errorf("-quiet: exit %d, said %q", code, stderr)
	}
}
