package compile

import (
	"bytes"
	"context"
	"errors"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"tally/runtime/host/symbols"
)

// TestSnapshotFresh fails when snapshot.zip is not what go generate would write now: a script
// handed over from a folder outside any checkout would then build against other sources than
// tally's own.
func TestSnapshotFresh(t *testing.T) {
	var pkgs []string
	for k := range symbols.Symbols {
		pkgs = append(pkgs, k[:strings.LastIndex(k, "/")])
	}
	want, err := SnapshotFiles("../..", pkgs)
	if err != nil {
		t.Skipf("cannot list the packages (%v)", err)
	}
	got, err := readSnapshot(snapshot)
	if err != nil {
		t.Fatal(err)
	}
	var stale []string
	for n, b := range want {
		if !bytes.Equal(got[n], b) {
			stale = append(stale, n)
		}
	}
	for n := range got {
		if _, ok := want[n]; !ok {
			stale = append(stale, n+" (gone)")
		}
	}
	if len(stale) > 0 {
		slices.Sort(stale)
		t.Errorf("snapshot.zip is stale (%s); run go generate ./runtime/compile", strings.Join(stale, ", "))
	}
	if _, ok := got["runtime/sim/experiment.go"]; !ok {
		t.Errorf("the snapshot lacks runtime/sim")
	}
}

// A script in a checkout of module tally builds there, as go run of it would; anywhere else
// (in another module, or none) from the snapshot.
func TestCheckoutOf(t *testing.T) {
	root, _ := filepath.Abs("../..")
	if got := checkoutOf(filepath.Join(root, "experiments", "uplink.go")); got != root {
		t.Errorf("experiments/uplink.go: checkout %q, want %q", got, root)
	}
	other := t.TempDir()
	os.WriteFile(filepath.Join(other, "go.mod"), []byte("module example.com/lab\n\ngo 1.26\n"), 0o644)
	os.MkdirAll(filepath.Join(other, "exp"), 0o755)
	if got := checkoutOf(filepath.Join(other, "exp", "a.go")); got != "" {
		t.Errorf("a script in another module: checkout %q, want none", got)
	}
	// This test binary was built from this checkout: its scripts build there, others from the
	// snapshot.
	if got := builtFrom(); got != root {
		t.Fatalf("built from %q, want %q", got, root)
	}
	cache := t.TempDir()
	for script, want := range map[string]string{filepath.Join(root, "experiments", "uplink.go"): "checkout", filepath.Join(other, "exp", "a.go"): "snapshot"} {
		m, err := moduleFor(script, cache)
		if err != nil || m.from != want {
			t.Errorf("%s: module %+v, %v; want from the %s", script, m, err, want)
		}
	}
}

// The go command's complaints become one sentence at the script's own path.
func TestBuildError(t *testing.T) {
	cache := t.TempDir()
	dir := filepath.Join(cache, "src", "h")                 // where the go command runs
	built := filepath.Join(cache, "work", "k-1", "main.go") // where the build put the script's copy
	for _, c := range []struct{ out, want string }{
		{"# command-line-arguments\n" + built + ":12:3: undefined: foo\n", "the compiler refused the script: exp/a.go:12:3: undefined: foo"},
		{"# command-line-arguments\n" + filepath.Join("..", "..", "work", "k-1", "main.go") + ":12:3: undefined: foo\n", "the compiler refused the script: exp/a.go:12:3: undefined: foo"},
		{"main.go:4:2: gonum.org/v1/gonum@v0.17.0: module lookup disabled by GOPROXY=off\n", "the Go module cache lacks gonum.org/v1/gonum v0.17.0, which tally needs (the build runs offline)"},
		{"go: go.mod requires go >= 1.26.0 (running go 1.24.1; GOTOOLCHAIN=local)\n", "the Go toolchain on PATH is go1.24.1; tally's module needs go1.26.0 or later"},
	} {
		if got := buildError(c.out, built, dir, "exp/a.go"); got != c.want {
			t.Errorf("%q:\n got %q\nwant %q", c.out, got, c.want)
		}
	}
}

// With no go command on PATH there is nothing to build with, and the reason says so.
func TestNoToolchain(t *testing.T) {
	t.Setenv("PATH", t.TempDir())
	_, err := Script(context.Background(), Request{Script: "a.go", Source: []byte("package main\n"), Cache: t.TempDir()})
	var u *Unavailable
	if !errors.As(err, &u) || !strings.Contains(u.Why, "no Go toolchain") {
		t.Errorf("got %v, want no toolchain", err)
	}
}

// The checkout a test binary was built from holds the snapshot's sources (TestSnapshotFresh);
// a copy of them is the same, and an edited or an added file makes it another version.
func TestSameAsSnapshot(t *testing.T) {
	files, err := readSnapshot(snapshot)
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	for name, b := range files {
		p := filepath.Join(dir, filepath.FromSlash(name))
		if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(p, b, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	if !sameAsSnapshot(dir) {
		t.Fatal("a copy of the snapshot is not the snapshot")
	}
	if root := builtFrom(); root != "" && !sameAsSnapshot(root) {
		t.Error("this checkout differs from the snapshot: run go generate ./runtime/compile")
	}
	extra := filepath.Join(dir, "blocks", "link", "extra.go")
	if err := os.WriteFile(extra, []byte("package link\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	if sameAsSnapshot(dir) {
		t.Error("an added file of a package went unseen")
	}
	os.Remove(extra)
	p := filepath.Join(dir, "blocks", "link", "link.go")
	b, _ := os.ReadFile(p)
	if err := os.WriteFile(p, append(b, "\n// edited\n"...), 0o644); err != nil {
		t.Fatal(err)
	}
	if sameAsSnapshot(dir) {
		t.Error("an edited file went unseen")
	}
}
