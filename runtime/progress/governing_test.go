package progress

import (
	"strings"
	"testing"
	"time"

	"tally/blocks/link"
	"tally/blocks/stats"
	"tally/blocks/stop"
	"tally/runtime/result"
)

// payloadProg is a prefix whose BER tap has a floor (1.7e-3) and whose payload tap has 57 errors
// in 1.2e6 bits.
func payloadProg() *stop.Progress {
	return &stop.Progress{Frames: 625, Taps: []string{link.TapBER, link.TapFER, "payload"},
		Counts:  []link.Tally{{Trials: 1.28e6, Errors: 2176}, {Trials: 625, Errors: 600}, {Trials: 1.2e6, Errors: 57}},
		Elapsed: time.Second}
}

// The live line counts the governing tap: its errors toward the goal its rule sets, its
// trials and its estimate with the fixed-n interval of the prefix (Clopper–Pearson, gonum),
// not the floored whole-frame BER. The bit cap stays on the BER tap's bits, which it judges.
func TestLiveGoverningTap(t *testing.T) {
	rules := []stop.Rule{stop.Errors(100).Tap("payload"), stop.Errors(1000), stop.Bits(1e7)}
	p := Point{Label: "ebn0_db=9", Index: 8, Total: 12, Rules: rules, Tap: "payload"}
	s := Live(p, payloadProg())
	e, _ := stats.ClopperPearson(57, 1.2e6, 0.95)
	for _, want := range []string{"[9/12] ebn0_db=9", "payload errors 57/100 of 1.2M", "bits 1.28M/10M",
		"payload " + short(e.Rate) + " [" + short(e.Low) + ", " + short(e.High) + "]"} {
		if !strings.Contains(s, want) {
			t.Errorf("live line %q lacks %q", s, want)
		}
	}
	if strings.Contains(s, "errors 2176") || strings.Contains(s, "/1000") {
		t.Errorf("live line %q counts the BER tap", s)
	}
	if e, b := GoalsOn(rules, "payload"); e != 100 || b != 1e7 {
		t.Errorf("GoalsOn payload = %d, %d; want 100, 1e7", e, b)
	}
	if e, _ := Goals(rules); e != 1000 {
		t.Errorf("Goals (BER) = %d, want 1000", e)
	}
	// A tap the prefix lacks falls back to the BER tap rather than show zeros.
	p.Tap = "missing"
	if s := Live(p, payloadProg()); !strings.Contains(s, " errors 2176/1000") {
		t.Errorf("live line %q: want the BER tap for a tap the link lacks", s)
	}
}

// The finished line of a point governed by the payload tap names its counts in table.csv's
// words, with the BER beside them.
func TestFinishedOnGoverningTap(t *testing.T) {
	rp := result.Point{Stop: "payload_errors", Seconds: 2.5, BitRate: 4e6, Taps: []result.Tap{
		{Name: "ber", Trials: 1e7, Errors: 17000, Rate: 1.7e-3, Low: 1.67e-3, High: 1.73e-3},
		{Name: "fer", Trials: 4883, Errors: 4800},
		{Name: "payload", Trials: 9375000, Errors: 100, Rate: 1.07e-5, Low: 8.7e-6, High: 1.3e-5}}}
	s := FinishedOn("ebn0_db=10", rp, "payload")
	for _, want := range []string{"payload_trials=9375000 payload_errors=100 payload=1.07e-05 [8.7e-06, 1.3e-05] ber=0.0017", "stop=payload_errors"} {
		if !strings.Contains(s, want) {
			t.Errorf("finished line %q lacks %q", s, want)
		}
	}
	if got, want := FinishedOn("ebn0_db=10", rp, "ber"), Finished("ebn0_db=10", rp); got != want || !strings.Contains(got, "bits=10000000 errors=17000") {
		t.Errorf("on the BER tap: %q, want %q", got, want)
	}
}
