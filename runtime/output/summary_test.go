package output

import (
	"strings"
	"testing"

	"tally/runtime/result"
)

// A point a sweep rule skipped counted nothing: its row has empty cells and the reason, not
// 0 bits, 0 errors and the interval [0, 1] of a measurement.
func TestSummarySkippedPoint(t *testing.T) {
	r := plotRun()
	r.Points = append(r.Points, result.Point{Values: []float64{8}, Stop: "skipped", Note: "predicted to need 4e11 bits, above the budget 1e10",
		Taps: []result.Tap{{Name: "ber", Absent: true}, {Name: "fer", Absent: true}}})
	s := string(Summary(r, nil))
	want := "| 8 | | | | | skipped: predicted to need 4e11 bits, above the budget 1e10 |"
	if !strings.Contains(s, want) {
		t.Errorf("no row %q in\n%s", want, s)
	}
	if strings.Contains(s, "| 0 | 0 | 0 | [0, 1] |") {
		t.Errorf("a skipped point reads as a measured zero:\n%s", s)
	}
	// A measured point keeps its counts.
	if !strings.Contains(s, "| 0 | 100000 | 500 |") {
		t.Errorf("the first point's counts are missing:\n%s", s)
	}
}
