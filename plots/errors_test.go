package plots

import (
	"bytes"
	"testing"
)

// The error trace draws bars, slips with their labels and unavailable time, and gives the same
// SVG bytes on every call (no time or random identifier in it).
func TestErrorsFigure(t *testing.T) {
	tr := ErrorTrace{Title: "Errors in cap.bin", XLabel: "time (s)", YLabel: "errors per second",
		From: []float64{0, 1, 2, 3}, To: []float64{1, 2, 3, 4}, Errors: []int64{0, 3, 250, 1},
		Lost: []bool{false, false, true, false}, Slips: []float64{2.5}, SlipLabels: []string{"+37"},
		Unavailable: [][2]float64{{1, 3}}}
	a, err := Errors(tr).SVG()
	if err != nil {
		t.Fatal(err)
	}
	b, _ := Errors(tr).SVG()
	if !bytes.Equal(a, b) {
		t.Error("two drawings of the same trace differ")
	}
	for _, want := range []string{"+37", "errors per second", "unavailable time", "bits not compared"} {
		if !bytes.Contains(a, []byte(want)) {
			t.Errorf("the figure lacks %q", want)
		}
	}
	if _, err := Errors(tr).PNG(); err != nil {
		t.Fatal(err)
	}
}
