package watch

import (
	"bufio"
	"bytes"
	"go/build/constraint"
	"os"
	"path/filepath"
	"strings"

	"tally/runtime/output"
	"tally/runtime/result"
)

// candidate reports whether a path in a watched folder may be an experiment: a .go file that
// is not a test and not an editor's hidden or backup file. The outputs folder beside a script
// holds no .go file, so the watcher never reacts to its own writes.
func candidate(path string) bool {
	base := filepath.Base(path)
	return strings.HasSuffix(base, ".go") && !strings.HasSuffix(base, "_test.go") &&
		!strings.HasPrefix(base, ".") && !strings.HasPrefix(base, "#")
}

// isExperiment reports whether a Go file's build constraint (before the package clause)
// excludes it from every ordinary build with the ignore tag, as an experiment file does.
func isExperiment(src []byte) bool {
	sc := bufio.NewScanner(bytes.NewReader(src))
	for sc.Scan() {
		line := strings.TrimSpace(sc.Text())
		if strings.HasPrefix(line, "package ") {
			return false
		}
		if constraint.IsGoBuild(line) || constraint.IsPlusBuild(line) {
			expr, err := constraint.Parse(line)
			if err == nil && expr.Eval(func(tag string) bool { return tag == "ignore" }) &&
				!expr.Eval(func(string) bool { return false }) {
				return true
			}
		}
	}
	return false
}

// experiments lists the experiment files of a folder, sorted by name.
func experiments(dir string) ([]string, error) {
	entries, err := os.ReadDir(dir)
	if err != nil {
		return nil, err
	}
	var out []string
	for _, e := range entries {
		p := filepath.Join(dir, e.Name())
		if e.Type().IsRegular() && candidate(p) {
			if src, err := os.ReadFile(p); err == nil && isExperiment(src) {
				out = append(out, p)
			}
		}
	}
	return out, nil
}

// lastRun reads the run record beside a script, so the first run under watch can say what
// changed since the outputs on disk. Nil when there is none or it does not parse.
func lastRun(script string) *result.Run {
	dir := output.Dir(script)
	r := output.ReadRecord(dir)
	if r != nil {
		output.ReadFrames(dir, r) // without them (an older run) Changes compares totals
	}
	return r
}
