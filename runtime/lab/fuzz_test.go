package lab_test

import (
	"encoding/json"
	"strings"
	"testing"
)

// check holds for any command line: exit 0 or 2; on 2 a message on stderr and nothing on
// stdout; on 0 nothing on stderr, and JSON output that parses, with no NaN or Inf anywhere.
func check(t *testing.T, name string, cmd func(string) (int, string, string), args string) {
	code, out, errs := cmd(args)
	switch code {
	case 0:
		if errs != "" {
			t.Errorf("%s %q: exit 0 with stderr %q", name, args, errs)
		}
		if strings.HasPrefix(out, "{") && !json.Valid([]byte(out)) {
			t.Errorf("%s %q: invalid JSON %q", name, args, out)
		}
		if !strings.HasPrefix(out, "usage:") && (strings.Contains(out, "NaN") || strings.Contains(out, "Inf")) {
			t.Errorf("%s %q: %q", name, args, out)
		}
	case 2:
		if errs == "" || out != "" {
			t.Errorf("%s %q: exit 2 with stdout %q, stderr %q", name, args, out, errs)
		}
		for _, lib := range libraryWords {
			if strings.Contains(errs, lib) {
				t.Errorf("%s %q: library wording %q in %q", name, args, lib, errs)
			}
		}
	default:
		t.Errorf("%s %q: exit %d", name, args, code)
	}
}

func FuzzPlan(f *testing.F) {
	for _, s := range []string{
		"-ber 1e-12", "-ber 1e-12 -errors 3 -rate 10e9 -json", "-ber 1e-12 -bits 3e12 -errors 1",
		"-ber 0.5 -confidence 0.999999 -errors 100000", "-ber 1e-9 -bits 1", "-h",
		"-ber 1e-9 -confidence 1e-300", // once a panic in gonum's χ² quantile
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, args string) { check(t, "plan", plan, args) })
}

func FuzzInterval(f *testing.F) {
	for _, s := range []string{
		"-errors 10 -bits 1e6", "-errors 0 -bits 1 -json", "-errors 5 -bits 5 -method jeffreys",
		"-errors 100 -bits 1e7 -stopped -json", "-errors 1 -bits 4611686018427387904 -method wilson", "-h",
		"-errors 1 -bits 4e18 -confidence 1e-300", "-errors 4e18 -bits 4e18 -stopped",
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, args string) { check(t, "interval", interval, args) })
}
