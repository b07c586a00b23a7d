package main

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func run(args ...string) (code int, stdout, stderr string) {
	var o, e bytes.Buffer
	code = dispatch(args, &o, &e)
	return code, o.String(), e.String()
}

// Exit codes: 0 success, 1 a failed script, 2 a usage error; every subcommand has -h.
func TestExitCodes(t *testing.T) {
	if c, _, _ := run(); c != 2 {
		t.Errorf("no command: exit %d, want 2", c)
	}
	if c, _, _ := run("nonsense"); c != 2 {
		t.Errorf("unknown command: exit %d, want 2", c)
	}
	for _, c := range commands {
		if code, _, _ := run(c.name, "-h"); code != 0 {
			t.Errorf("tally %s -h: exit %d, want 0", c.name, code)
		}
	}
	if c, _, _ := run("run"); c != 2 {
		t.Errorf("run without a file: exit %d, want 2", c)
	}
	if c, _, _ := run("run", "-no-such-flag", "x.go"); c != 2 {
		t.Errorf("run with a bad flag: exit %d, want 2", c)
	}
	dir := t.TempDir()
	bad := filepath.Join(dir, "bad.go")
	os.WriteFile(bad, []byte("//go:build ignore\n\npackage main\n\nfunc main() {\n\tx := 1 +\n}\n"), 0o644)
	code, _, stderr := run("run", bad)
	if code != 1 || !strings.HasPrefix(stderr, bad+":") {
		t.Errorf("broken script: exit %d, stderr %q; want 1 and %s:line:col", code, stderr, bad)
	}
}
