package plots

import (
	"strings"
	"testing"

	"tally/runtime/result"
)

// Weighted points are drawn as estimates (a semi-analytic point has no counted errors but is
// no upper bound), marked, and named in the legend; a degenerate one is crossed out (our own
// plot convention; common practice, no source).
func TestEstimatedPointsMarked(t *testing.T) {
	r := &result.Run{Name: "low", Params: []string{"ebn0_db"}, Taps: []string{"ber"}, Confidence: 0.95,
		Points: []result.Point{
			{Values: []float64{10}, Taps: []result.Tap{{Name: "ber", Trials: 4096, Errors: 300, Rate: 1e-6, Low: 9e-7, High: 1.1e-6, Estimator: "importance-sampling", Effective: 400}}},
			{Values: []float64{12}, Taps: []result.Tap{{Name: "ber", Trials: 4096, Rate: 1e-9, Low: 9e-10, High: 1.1e-9, Estimator: "semi-analytic", Effective: 900}}},
			{Values: []float64{14}, Taps: []result.Tap{{Name: "ber", Trials: 4096, Rate: 1e-13, Low: 5e-14, High: 2e-13, Estimator: "semi-analytic", Effective: 9, Degenerate: true}}},
		}}
	f, err := BER(r)
	if err != nil || f == nil {
		t.Fatalf("figure: %v", err)
	}
	names := strings.Join(f.Legend.names, "|")
	for _, want := range []string{"importance sampling", "semi-analytic", "weights degenerated"} {
		if !strings.Contains(names, want) {
			t.Errorf("legend %q lacks %q", names, want)
		}
	}
	if strings.Contains(names, "upper bound") {
		t.Errorf("a semi-analytic point drawn as an upper bound: %q", names)
	}
	s := tapSeries(r.Points, 0)
	if s.y[1] != 1e-9 || s.y[2] != 1e-13 {
		t.Errorf("weighted points not drawn at their estimates: %v", s.y)
	}
	m := estimatorMarks(r.Points, 0, nil)
	if m == nil || len(m.shapes) != 4 {
		t.Fatalf("marks: %+v", m)
	}
	if _, err := f.SVG(); err != nil {
		t.Fatal(err)
	}
}
