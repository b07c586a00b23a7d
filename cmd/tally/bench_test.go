package main

import (
	"strings"
	"testing"
)

// tally bench: a usage error exits 2, a bit count below one frame exits 1 with a message, a
// small run prints the ratio lines.
func TestBenchCommand(t *testing.T) {
	if c, _, _ := run("bench", "extra"); c != 2 {
		t.Errorf("bench with an argument: exit %d, want 2", c)
	}
	if c, _, e := run("bench", "-bits", "10"); c != 1 || !strings.Contains(e, "less than one frame") {
		t.Errorf("bench -bits 10: exit %d, %q", c, e)
	}
	c, out, e := run("bench", "-bits", "100000", "-rounds", "1", "-workers", "1")
	if c != 0 || !strings.Contains(out, "script/reference=") || !strings.Contains(out, "script/compiled=") {
		t.Errorf("bench: exit %d\n%s%s", c, out, e)
	}
}
