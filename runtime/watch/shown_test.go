package watch

import (
	"strings"
	"tally/blocks/stats"
	"testing"

	"tally/blocks/compare"
	"tally/runtime/result"
)

// What changed is judged on the tap the run shows: a run governed by its payload tap compares
// the payload counts (Fisher's exact test, compare.Proportions), not the floored frame BER,
// whose counts did not move here.
func TestChangesOnShownTap(t *testing.T) {
	run := func(k int64) *result.Run {
		r := &result.Run{Params: []string{"ebn0_db"}, Taps: []string{"ber", "fer", "payload"}, Shown: []string{"payload"}, Confidence: 0.95}
		r.Points = append(r.Points, result.Point{Values: []float64{8}, Taps: []result.Tap{
			{Name: "ber", Trials: 1e6, Errors: 1700, Rate: 1.7e-3}, {Name: "fer", Trials: 500},
			{Name: "payload", Trials: 9e5, Errors: k, Rate: float64(k) / 9e5}}})
		return r
	}
	got := strings.Join(Changes(run(30), run(90)), "\n")
	res, _ := compare.Proportions(30, 9e5, 90, 9e5)
	for _, want := range []string{"ebn0_db=8  payload 3.33e-05 → 0.0001 (×3)  CHANGED, " + stats.FormatP(res.P) + " (Fisher on totals)", "p on the payload counts: Fisher on totals"} {
		if !strings.Contains(got, want) {
			t.Errorf("Changes lacks %q:\n%s", want, got)
		}
	}
}
