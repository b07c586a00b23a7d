package sim

import (
	"crypto/sha256"
	"encoding/hex"
	"os"
	"path/filepath"
	"strings"
	"tally/runtime/internal/runner"
	"testing"

	"tally/blocks/stop"
)

// ReadFile reads inside the script's folder only: the standard library's os.Root is the
// reference for what escapes (absolute paths, "..", symbolic links out).
func TestReadScriptFile(t *testing.T) {
	top := t.TempDir()
	dir := filepath.Join(top, "exp")
	if err := os.MkdirAll(filepath.Join(dir, "codes"), 0o755); err != nil {
		t.Fatal(err)
	}
	script := filepath.Join(dir, "x.go")
	write := func(p, s string) {
		if err := os.WriteFile(p, []byte(s), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	write(filepath.Join(dir, "codes", "a.alist"), "7 3\n")
	write(filepath.Join(top, "secret"), "outside")
	if got, err := readScriptFile(script, "codes/a.alist"); err != nil || got != "7 3\n" {
		t.Fatalf("inside: %q, %v", got, err)
	}
	symOK := os.Symlink(filepath.Join(top, "secret"), filepath.Join(dir, "codes", "link")) == nil
	if err := os.Symlink(filepath.Join("codes", "a.alist"), filepath.Join(dir, "inner")); err != nil {
		symOK = false
	}
	refused := map[string]string{
		"../secret":             "inside the script's folder",
		"codes/../../secret":    "inside the script's folder",
		filepath.Join(top, "x"): "inside the script's folder",
		"":                      "inside the script's folder",
		"codes/missing.alist":   "no file",
		"codes":                 "not a regular file",
	}
	if symOK {
		refused["codes/link"] = "leads outside"
		if got, err := readScriptFile(script, "inner"); err != nil || got != "7 3\n" {
			t.Errorf("a link inside the folder: %q, %v", got, err)
		}
	}
	for name, want := range refused {
		got, err := readScriptFile(script, name)
		if err == nil || !strings.Contains(err.Error(), want) || !strings.HasPrefix(err.Error(), "sim.ReadFile: ") {
			t.Errorf("%q: %q, %v; want an error with %q", name, got, err, want)
		}
	}
}

// The files a script reads are recorded in the run with their SHA-256 (crypto/sha256 is the
// reference), so run.json says what the results depend on.
func TestReadFileRecorded(t *testing.T) {
	dir := t.TempDir()
	if err := os.WriteFile(filepath.Join(dir, "h.alist"), []byte("7 3\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	x := testExperiment("inputs", &runner.Options{Quiet: true, Workers: 1, Script: filepath.Join(dir, "x.go")})
	if got := x.ReadFile("h.alist"); got != "7 3\n" {
		t.Fatalf("read %q", got)
	}
	x.Sweep("ebn0_db", 4)
	x.Link(progressLink)
	x.Stop(stop.Bits(512))
	r, err := x.execute()
	if err != nil {
		t.Fatal(err)
	}
	sum := sha256.Sum256([]byte("7 3\n"))
	want := hex.EncodeToString(sum[:])
	if len(r.Inputs) != 1 || r.Inputs[0].Name != "h.alist" || r.Inputs[0].SHA256 != want {
		t.Errorf("inputs %+v", r.Inputs)
	}
}
