package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"tally/blocks/link"
	"tally/blocks/source"
)

// writeCapture writes n bits of the O.150 PRBS of the order (tally's own source), packed
// first bit most significant, with the bits at flips inverted.
func writeCapture(t *testing.T, path string, order, n int, flips ...int) {
	t.Helper()
	f := &link.Frame{}
	if err := source.PRBS(order, n).Process(f, nil); err != nil {
		t.Fatal(err)
	}
	for _, p := range flips {
		f.Bits[p] ^= 1
	}
	out := make([]byte, n/8)
	for i, b := range f.Bits {
		out[i/8] |= b << (7 - i%8)
	}
	if err := os.WriteFile(path, out, 0o644); err != nil {
		t.Fatal(err)
	}
}

func TestCountCommand(t *testing.T) {
	dir := t.TempDir()
	capt := filepath.Join(dir, "cap.bin")
	writeCapture(t, capt, 23, 800_000, 1000, 250_000, 250_001, 700_000)
	out := filepath.Join(dir, "out")

	code, stdout, stderr := run("count", "-prbs", "23", "-rate", "100k", "-json", "-o", out, capt)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var fields map[string]any
	if err := json.Unmarshal([]byte(stdout), &fields); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"bits", "errors", "ber", "ci_low", "ci_high", "upper", "slips", "errored_seconds", "severely_errored_seconds", "unavailable_seconds"} {
		if _, ok := fields[k]; !ok {
			t.Errorf("-json lacks %q", k)
		}
	}
	if fields["errors"].(float64) != 4 || fields["bits"].(float64) != 800_000 || fields["errored_seconds"].(float64) != 3 {
		t.Errorf("errors %v bits %v errored seconds %v", fields["errors"], fields["bits"], fields["errored_seconds"])
	}
	for _, f := range []string{"table.csv", "run.json", "errors.svg", "errors.png", "README.md"} {
		if _, err := os.Stat(filepath.Join(out, f)); err != nil {
			t.Errorf("-o did not write %s", f)
		}
	}
	before, _ := os.ReadFile(filepath.Join(out, "run.json"))

	// A failed count says what is wrong and where, exits 1 and leaves the last results alone.
	text := filepath.Join(dir, "text.bin")
	os.WriteFile(text, []byte(strings.Repeat("0110 1001 ", 50)+"01x0"), 0o644)
	clean := filepath.Join(dir, "clean.bin")
	os.WriteFile(clean, []byte(strings.Repeat("0110 1001\n", 50)), 0o644)
	empty := filepath.Join(dir, "empty.bin")
	os.WriteFile(empty, nil, 0o644)
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"-format", "ascii", text}, "at byte 502"},
		{[]string{"-prbs", "9", clean}, "text of 0 and 1 characters"},
		{[]string{"-prbs", "31", "-o", out, capt}, "lock with -prbs 23"},
		{[]string{"-o", out, empty}, "is empty"},
	} {
		args := append([]string{"count", "-prbs", "23"}, c.args...)
		code, _, stderr := run(args...)
		if code != 1 || !strings.Contains(stderr, c.want) || !strings.Contains(stderr, "nothing written") {
			t.Errorf("%v: exit %d, %q; want 1 and %q", c.args, code, stderr, c.want)
		}
	}
	after, _ := os.ReadFile(filepath.Join(out, "run.json"))
	if string(before) != string(after) {
		t.Error("a failed count replaced the last results")
	}

	// usage errors exit 2
	for _, args := range [][]string{
		{"count", capt},
		{"count", "-prbs", "23", "-ref", capt, capt},
		{"count", "-prbs", "8", capt},
		{"count", "-prbs", "23", "-rate", "10X", capt},
		{"count", "-prbs", "23", "-rate", "1M", "-block", "3000", capt},
		{"count", "-prbs", "23", "-format", "morse", capt},
		{"count", "-prbs", "23"},
	} {
		if code, _, _ := run(args...); code != 2 {
			t.Errorf("%v: exit %d, want 2", args, code)
		}
	}
}

// Standard input is read like a file.
func TestCountStdin(t *testing.T) {
	dir := t.TempDir()
	capt := filepath.Join(dir, "cap.bin")
	writeCapture(t, capt, 9, 40_000, 5)
	f, err := os.Open(capt)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	old := os.Stdin
	os.Stdin = f
	defer func() { os.Stdin = old }()
	code, stdout, stderr := run("count", "-prbs", "9", "-")
	if code != 0 || !strings.Contains(stdout, "1 error, BER 2.5e-05") {
		t.Errorf("exit %d: %s%s", code, stdout, stderr)
	}
}
