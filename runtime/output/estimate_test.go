package output

import (
	"strings"
	"testing"

	"tally/runtime/result"
)

// A run with weighted points closes its table with the estimator columns (counted points say
// "count") and its summary with the Estimators section; a run without keeps its columns as
// before (common practice, no source: existing tables must not change).
func TestWeightedTableAndSummary(t *testing.T) {
	r := &result.Run{Name: "w", Params: []string{"ebn0_db"}, Taps: []string{"ber"}, Confidence: 0.95,
		Points: []result.Point{
			{Values: []float64{4}, Stop: "errors", Taps: []result.Tap{{Name: "ber", Trials: 1000, Errors: 100, Rate: 0.1, Low: 0.08, High: 0.12}}},
			{Values: []float64{14}, Stop: "errors", Taps: []result.Tap{{Name: "ber", Trials: 40960, Errors: 3800, Rate: 4.5e-13, Low: 4e-13, High: 5e-13,
				Method: "importance-sampling+t", Estimator: "importance-sampling", Effective: 431, PlainBits: 6.3e14}}},
			{Values: []float64{16}, Stop: "bits", Taps: []result.Tap{{Name: "ber", Trials: 1e7, Rate: 1e-15, Low: 5e-16, High: 1.9e-15,
				Estimator: "semi-analytic", Effective: 14, Degenerate: true}}},
		}}
	table := string(Table(r))
	for _, want := range []string{
		"ebn0_db,ber_trials,ber_errors,ber,ber_low,ber_high,stop,estimator,effective_samples,weights,plain_bits_needed\n",
		"4,1000,100,0.1,0.08,0.12,errors,count,,,\n",
		"14,40960,3800,4.5e-13,4e-13,5e-13,errors,importance-sampling,431,ok,6.3e+14\n",
		"16,10000000,0,1e-15,5e-16,1.9e-15,bits,semi-analytic,14,degenerate,\n",
	} {
		if !strings.Contains(table, want) {
			t.Errorf("table lacks %q:\n%s", want, table)
		}
	}
	sum := string(Summary(r, nil))
	for _, want := range []string{"## Estimators", "| 14 | importance-sampling | 40960 | 4.5e-13 | 6.3e+14 | 1.5e+10× | 431 |", "14 (degenerate)", "not to be read as precise"} {
		if !strings.Contains(sum, want) {
			t.Errorf("summary lacks %q:\n%s", want, sum)
		}
	}
	r.Points = r.Points[:1]
	if table := string(Table(r)); strings.Contains(table, "estimator") || strings.Contains(string(Summary(r, nil)), "Estimators") {
		t.Errorf("a counted run changed its table or summary:\n%s", table)
	}
}
