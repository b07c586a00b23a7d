package output

import (
	"strings"
	"testing"

	"tally/runtime/result"
)

// A paired line names every parameter but the variants' own, even one whose value happens to
// be a variant's name (a site called "hot" beside a variant called "hot").
func TestPairedLineKeepsEveryOtherParameter(t *testing.T) {
	r := &result.Run{Name: "sites", Params: []string{"ebn0_db", "site", "rx"}, Labels: [][]string{nil, {"cold", "hot"}, {"ref", "hot"}},
		Confidence: 0.95, Taps: []string{"ber"}}
	for _, site := range []float64{0, 1} {
		r.Points = append(r.Points,
			result.Point{Values: []float64{4, site, 0}, Taps: []result.Tap{{Name: "ber", Trials: 1000, Errors: 10, Rate: 0.01}}},
			result.Point{Values: []float64{4, site, 1}, Taps: []result.Tap{{Name: "ber", Trials: 1000, Errors: 5, Rate: 0.005}},
				Paired: &result.Comparison{Against: "ref", Variant: "hot", Verdict: "no difference shown (p = 0.2)", Method: "paired"}})
	}
	sum := string(Summary(r, nil))
	for _, want := range []string{"ebn0_db 4, site cold, hot against ref", "ebn0_db 4, site hot, hot against ref"} {
		if !strings.Contains(sum, want) {
			t.Errorf("summary lacks %q:\n%s", want, sum)
		}
	}
}
