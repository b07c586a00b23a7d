package runner

import (
	"math"
	"strings"
	"testing"

	"tally/blocks/stats"
)

// A target's note names what happened, not the library function that found it.
func TestNoteWithoutFunctionNames(t *testing.T) {
	est := []stats.Estimate{{Rate: 0.1, Low: 0.09, High: 0.11}, {Rate: 0.01, Low: 0.009, High: 0.011}}
	_, err := stats.AtTarget([]float64{0, 1}, est, 1e-6)
	if err == nil {
		t.Fatal("a target below the sweep crossed")
	}
	if got, want := note(err), "the curve does not reach 1e-06 in the sweep"; got != want {
		t.Errorf("note %q, want %q", got, want)
	}
	cr, err := stats.AtTarget([]float64{0, 1}, est, 0.03)
	if err != nil {
		t.Fatal(err)
	}
	_, err = stats.Penalty(cr, func(float64) float64 { return math.NaN() })
	if err == nil || strings.Contains(note(err), "stats.") || !strings.HasPrefix(note(err), "the theory curve is NaN") {
		t.Errorf("penalty note %q", note(err))
	}
}
