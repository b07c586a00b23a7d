package main

import (
	"errors"
	"path/filepath"
	"strings"
	"testing"
)

// An error is prefixed with the command once: "tally merge: no shard files", not
// "tally merge: merge: no shard files".
func TestNoDoubledPrefix(t *testing.T) {
	dir := t.TempDir()
	code, _, stderr := run("merge", dir)
	if code != 1 || !strings.HasPrefix(stderr, "tally merge: ") || strings.Contains(stderr, "merge: merge:") {
		t.Errorf("merge of an empty folder: exit %d, %q", code, stderr)
	}
	missing := filepath.Join(dir, "none.tally")
	code, _, stderr = run("merge", missing)
	if want := "tally merge: " + missing + ": no such shard file or folder\n"; code != 1 || stderr != want {
		t.Errorf("merge of a missing file: exit %d, %q, want %q", code, stderr, want)
	}
	code, _, stderr = run("bench", "-bits", "10")
	if code != 1 || !strings.HasPrefix(stderr, "tally bench: -bits 10 is less than one frame") {
		t.Errorf("bench with too few bits: exit %d, %q", code, stderr)
	}
	var b strings.Builder
	complain(&b, "merge", errors.New("merge: shard(s) 1 of 2 missing (have s0)"))
	if got := b.String(); got != "tally merge: shard(s) 1 of 2 missing (have s0)\n" {
		t.Errorf("complain: %q", got)
	}
}
