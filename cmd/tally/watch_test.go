package main

import (
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
