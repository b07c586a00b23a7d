package symbols

import (
	"bytes"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
)

// TestSymbolsFresh regenerates the tables in a temporary folder and compares them with the
// checked-in ones: a script-facing API change without `go generate ./...` fails here.
func TestSymbolsFresh(t *testing.T) {
	if testing.Short() {
		t.Skip("runs the extractor")
	}
	src, err := os.ReadFile("symbols.go")
	if err != nil {
		t.Fatal(err)
	}
	m := regexp.MustCompile(`(?m)^//go:generate go tool yaegi extract -name symbols (.*)$`).FindSubmatch(src)
	if m == nil {
		t.Fatal("no go:generate line in symbols.go")
	}
	pkgs := strings.Fields(string(m[1]))
	// The extractor writes into its working folder, which must lie inside the module: use a
	// hidden folder here (the go command ignores names starting with a dot).
	dir, err := os.MkdirTemp(".", ".fresh-*")
	if err != nil {
		t.Fatal(err)
	}
	defer os.RemoveAll(dir)
	gen := exec.Command("go", append([]string{"tool", "yaegi", "extract", "-name", "symbols"}, pkgs...)...)
	gen.Dir = dir
	if out, err := gen.CombinedOutput(); err != nil {
		t.Fatalf("extract: %v\n%s", err, out)
	}
	for _, p := range pkgs {
		name := strings.ReplaceAll(p, "/", "-") + ".go"
		want, err := os.ReadFile(filepath.Join(dir, name))
		if err != nil {
			t.Fatal(err)
		}
		got, err := os.ReadFile(name)
		if err != nil {
			t.Fatalf("%s is missing: run go generate ./...", name)
		}
		if !bytes.Equal(got, want) {
			t.Errorf("%s is stale: run go generate ./...", name)
		}
	}
}
