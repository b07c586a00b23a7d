package host

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// The demos as they were written before the typed surface (x.Sweep, x.SweepLabels, a string
// switch per label, theory by name, x.Scatter by float index), kept in testdata/older with
// smaller stop rules so the test is quick, still run and give the table they gave then
// (testdata/older/<name>.csv, written by the version before the typed surface). Each has a
// twin in testdata/newer written on the typed surface (x.Axis, x.Curve(…).Theory(…), a curve's
// Scatter), which must give the same bytes: the two forms declare the same experiment.
func TestOlderFormStillRuns(t *testing.T) {
	for _, name := range []string{"uplink", "modems", "fading", "impairments", "telemetry", "backhaul", "codes"} {
		t.Run(name, func(t *testing.T) {
			want, err := os.ReadFile(filepath.Join("testdata", "older", name+".csv"))
			if err != nil {
				t.Fatal(err)
			}
			older := copyScript(t, "older", name+".go")
			if err := Run(context.Background(), older, quiet(2)); err != nil {
				t.Fatalf("older form: %v", err)
			}
			if got := table(t, older); !bytes.Equal(got, want) {
				t.Fatalf("older form: table differs from the one it gave before\n%s\nwant\n%s", got, want)
			}
			newer := copyScript(t, "newer", name+".go")
			if err := Run(context.Background(), newer, quiet(2)); err != nil {
				t.Fatalf("typed form: %v", err)
			}
			if got := table(t, newer); !bytes.Equal(got, want) {
				t.Fatalf("typed form: table differs from the older form's\n%s\nwant\n%s", got, want)
			}
			// The scatter plot, where one is asked for, shows the same frame.
			a, errA := os.ReadFile(filepath.Join(strings.TrimSuffix(older, ".go"), "scatter.svg"))
			b, errB := os.ReadFile(filepath.Join(strings.TrimSuffix(newer, ".go"), "scatter.svg"))
			if (errA == nil) != (errB == nil) || !bytes.Equal(a, b) {
				t.Fatalf("scatter.svg differs between the forms (older: %v, typed: %v)", errA, errB)
			}
		})
	}
}

// copyScript copies testdata/dir/name into a fresh folder of its own, so its outputs land there.
func copyScript(t *testing.T, dir, name string) string {
	t.Helper()
	src, err := os.ReadFile(filepath.Join("testdata", dir, name))
	if err != nil {
		t.Fatal(err)
	}
	p := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(p, src, 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}
