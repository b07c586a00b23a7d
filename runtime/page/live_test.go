package page

import (
	"testing"
	"time"

	"tally/blocks/link"
	"tally/blocks/stats"
	"tally/blocks/stop"
	"tally/runtime/progress"
)

// The page's progress bar fills toward the governing tap's error goal and shows its estimate
// (Clopper–Pearson of the prefix, gonum), as the terminal's live line does.
func TestLiveOfGoverningTap(t *testing.T) {
	pr := &stop.Progress{Frames: 10, Taps: []string{link.TapBER, link.TapFER, "payload"},
		Counts:  []link.Tally{{Trials: 20480, Errors: 300}, {Trials: 10, Errors: 9}, {Trials: 19200, Errors: 40}},
		Elapsed: time.Second}
	p := progress.Point{Label: "ebn0_db=6", Total: 3, Tap: "payload",
		Rules: []stop.Rule{stop.Errors(100).Tap("payload"), stop.Errors(1000), stop.Bits(1e6)}}
	l := LiveOf(p, pr)
	e, _ := stats.ClopperPearson(40, 19200, 0.95)
	if l.Tap != "payload" || l.Errors != 40 || l.Goal != 100 || l.Bits != 20480 || l.Cap != 1e6 || l.BER != e.Rate || l.Low != e.Low || l.High != e.High {
		t.Errorf("live %+v: want payload 40/100 errors, 20480 bits of 1e6, estimate %+v", l, e)
	}
}
