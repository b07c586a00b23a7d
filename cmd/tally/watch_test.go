package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// tally watch: no path is a usage error (2), a path that does not exist a failure (1).
func TestWatchCommand(t *testing.T) {
	if c, _, _ := run("watch"); c != 2 {
		t.Errorf("watch without a path: exit %d, want 2", c)
	}
	missing := filepath.Join(t.TempDir(), "missing.go")
	code, _, stderr := run("watch", missing)
	if code != 1 || !strings.Contains(stderr, "missing.go") {
		t.Errorf("watch of a missing file: exit %d, stderr %q", code, stderr)
	}
}

// tally watch -http: an address it cannot use fails before watching (1), a malformed one too.
func TestWatchHTTPAddress(t *testing.T) {
	dir := t.TempDir()
	exp := filepath.Join(dir, "e.go")
	os.WriteFile(exp, []byte("//go:build ignore\n\npackage main\n\nfunc main() {}\n"), 0o644)
	for _, addr := range []string{"8080", "no.such.host.invalid:0"} {
		code, _, stderr := run("watch", "-http", addr, exp)
		if code != 1 || !strings.Contains(stderr, "page:") {
			t.Errorf("-http %s: exit %d, stderr %q", addr, code, stderr)
		}
	}
}

// tally run -html writes index.html beside the other outputs: one file with the run's data.
func TestRunHTML(t *testing.T) {
	dir := t.TempDir()
	exp := filepath.Join(dir, "tiny.go")
	os.WriteFile(exp, []byte(`//go:build ignore

package main

import (
	"tally/blocks/channel"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/source"
	"tally/blocks/stop"
	"tally/runtime/sim"
)

func main() {
	x := sim.New("tiny link")
	x.Sweep("ebn0_db", 0, 2)
	x.Link(func(p sim.Point) *link.Link {
		m := modem.BPSK()
		return link.Chain(source.Random(512), m.Mod(), channel.AWGN(p.Get("ebn0_db")), m.Demod())
	})
	x.Stop(stop.Errors(10), stop.Bits(1e5))
	x.Run()
}
`), 0o644)
	code, _, stderr := run("run", "-quiet", "-html", exp)
	if code != 0 {
		t.Fatalf("run -html: exit %d: %s", code, stderr)
	}
	b, err := os.ReadFile(filepath.Join(dir, "tiny", "index.html"))
	if err != nil {
		t.Fatal(err)
	}
	if s := string(b); !strings.Contains(s, `id="snapshot"`) || !strings.Contains(s, `"name":"tiny link"`) || strings.Contains(s, `src="`) {
		t.Errorf("index.html is not the self-contained page of the run (%d bytes)", len(b))
	}
	// Without -html no page is written.
	os.Remove(filepath.Join(dir, "tiny", "index.html"))
	if code, _, _ := run("run", "-quiet", exp); code != 0 {
		t.Fatal("run failed")
	}
	if _, err := os.Stat(filepath.Join(dir, "tiny", "index.html")); err == nil {
		t.Error("index.html written without -html")
	}
}
