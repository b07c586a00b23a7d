package output

import (
	"strings"
	"testing"

	"tally/runtime/result"
)

// Every tap's column group follows one pattern, q_trials, q_errors, q, q_low, q_high, so a
// reader finds any tap's figures from its name alone; a point a sweep rule skipped has empty
// cells, not the 0 of 0 with the interval [0, 1] a measurement would give (common practice,
// no source: an empty cell is "not measured" to every spreadsheet and data-frame reader).
func TestTableColumns(t *testing.T) {
	r := &result.Run{Name: "t", Params: []string{"ebn0_db"}, Taps: []string{"ber", "fer", "pre", "payload"},
		Theory: []string{"coherent"},
		Points: []result.Point{
			{Values: []float64{2}, Stop: "payload_errors", Theory: []float64{0.0375}, Taps: []result.Tap{
				{Name: "ber", Trials: 2048, Errors: 70, Rate: 0.0341797, Low: 0.0267, High: 0.043},
				{Name: "fer", Trials: 2, Errors: 2, Rate: 1, Low: 0.158, High: 1},
				{Name: "pre", Trials: 4096, Errors: 300, Rate: 0.0732422, Low: 0.065, High: 0.081},
				{Name: "payload", Trials: 1792, Errors: 60, Rate: 0.0334821, Low: 0.0256, High: 0.0429}}},
			{Values: []float64{4}, Stop: "skipped", Note: "predicted to need 4e11 bits", Theory: []float64{0.0125}, Taps: []result.Tap{
				{Name: "ber", High: 1}, {Name: "fer", High: 1}, {Name: "pre", High: 1}, {Name: "payload", High: 1}}},
		}}
	got := string(Table(r))
	want := "ebn0_db," +
		"ber_trials,ber_errors,ber,ber_low,ber_high,stop," +
		"fer_trials,fer_errors,fer,fer_low,fer_high," +
		"pre_ber_trials,pre_ber_errors,pre_ber,pre_ber_low,pre_ber_high," +
		"payload_trials,payload_errors,payload,payload_low,payload_high," +
		"theory_coherent\n" +
		"2,2048,70,0.0341797,0.0267,0.043,payload_errors,2,2,1,0.158,1,4096,300,0.0732422,0.065,0.081,1792,60,0.0334821,0.0256,0.0429,0.0375\n" +
		"4,,,,,,skipped,,,,,,,,,,,,,,,,0.0125\n"
	if got != want {
		t.Errorf("table.csv:\n%s\nwant:\n%s", got, want)
	}
	if strings.Contains(got, "ci_low") || strings.Contains(got, ",0,0,0,0,1,") {
		t.Errorf("old column names or a skipped row read as a measured zero:\n%s", got)
	}
}
