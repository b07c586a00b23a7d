package plots

import (
	"strings"
	"testing"
)

// The caption names each interval method of the main tap once, without the "+clustered"
// variants a widened point's method carries, and says instead that intervals were widened
// where errors came in bursts (before: "stagewise / clopper-pearson / stagewise+clustered /
// clopper-pearson+clustered").
func TestCaptionNamesMethodsOnce(t *testing.T) {
	r := sampleRun(false, false)
	methods := []string{"stagewise", "clopper-pearson", "stagewise+clustered", "clopper-pearson+clustered", "stagewise"}
	for i := range r.Points {
		r.Points[i].Taps[0].Method = methods[i%len(methods)]
	}
	got := caption(r, 0)
	want := "uplink.go · seed 1 · stagewise / clopper-pearson intervals at 95 %, widened where errors came in bursts · 11 points"
	if got != want {
		t.Errorf("caption %q, want %q", got, want)
	}
	for i := range r.Points {
		r.Points[i].Taps[0].Method = "stagewise"
	}
	if got := caption(r, 0); strings.Contains(got, "widened") || strings.Count(got, "stagewise") != 1 {
		t.Errorf("caption %q: one method, nothing widened", got)
	}
}
