package main

import (
	"bytes"
	"runtime"
	"runtime/debug"
	"strings"
	"testing"

	"tally/runtime/host"
)

// tally version names tally's version (the one run.json records), the Go version and every
// module built in with its version and sum, as the standard library's runtime/debug reports
// them for this binary.
func TestVersion(t *testing.T) {
	var out, errb bytes.Buffer
	if code := dispatch([]string{"version"}, &out, &errb); code != 0 {
		t.Fatalf("exit %d: %s", code, errb.String())
	}
	text := out.String()
	lines := strings.Split(text, "\n")
	if lines[0] != "tally "+host.Version {
		t.Errorf("first line %q, want %q", lines[0], "tally "+host.Version)
	}
	if !strings.Contains(text, runtime.Version()) {
		t.Errorf("no Go version %s in\n%s", runtime.Version(), text)
	}
	bi, ok := debug.ReadBuildInfo()
	if !ok {
		t.Fatal("the test binary has no build information")
	}
	if len(bi.Deps) == 0 {
		t.Fatal("the test binary records no modules: nothing to compare")
	}
	for _, m := range bi.Deps {
		if !strings.Contains(text, m.Path+" "+m.Version+" "+m.Sum) {
			t.Errorf("module %s %s %s missing from\n%s", m.Path, m.Version, m.Sum, text)
		}
	}
	if code := dispatch([]string{"version", "extra"}, &out, &errb); code != 2 {
		t.Errorf("tally version extra: exit %d, want 2 (usage)", code)
	}
}
