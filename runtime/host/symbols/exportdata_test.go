package symbols

import (
	"bytes"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// TestExportDataFresh regenerates the export data and compares it with the embedded file: a
// change to a script-facing package (or to the package list on the go:generate line) without
// go generate fails here.
func TestExportDataFresh(t *testing.T) {
	if testing.Short() {
		t.Skip("compiles the export data of every script-visible package")
	}
	out := filepath.Join(t.TempDir(), "exportdata.bin")
	gen := exec.Command("go", "run", "exportgen.go", "-o", out)
	if b, err := gen.CombinedOutput(); err != nil {
		t.Fatalf("exportgen: %v\n%s", err, b)
	}
	packed, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	want, err := Unpack(packed)
	if err != nil {
		t.Fatal(err)
	}
	if bytes.Equal(ExportData(), want) {
		return
	}
	header := func(b []byte) string {
		lines := strings.SplitN(string(b), "\n", 3)
		if len(lines) < 2 {
			return ""
		}
		return lines[1]
	}
	if h, w := header(ExportData()), header(want); h != w {
		t.Fatalf("exportdata.bin was made for %q, this toolchain makes %q: run go generate ./runtime/host/symbols with the Go release go.mod names", h, w)
	}
	t.Fatal("exportdata.bin is stale: run go generate ./runtime/host/symbols")
}

// Nothing in the data names a folder of the machine it was made on (it is written without
// positions): neither the module's nor the toolchain's.
func TestExportDataHoldsNoPaths(t *testing.T) {
	root, err := filepath.Abs(filepath.Join("..", "..", ".."))
	if err != nil {
		t.Fatal(err)
	}
	dirs := []string{root}
	if out, err := exec.Command("go", "env", "GOROOT").Output(); err == nil {
		dirs = append(dirs, strings.TrimSpace(string(out)))
	}
	for _, d := range dirs {
		if bytes.Contains(ExportData(), []byte(d)) {
			t.Errorf("the export data names %s", d)
		}
	}
}
