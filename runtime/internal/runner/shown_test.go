package runner

import (
	"bytes"
	"io"
	"slices"
	"strings"
	"testing"

	"tally/blocks/link"
	"tally/blocks/stop"
)

// A point governed by the frame error count shows that count in its live line and its
// finished line, and the run records the tap it shows; stop.Below adds its rate as a spec.
func TestProgressCountsGoverningTap(t *testing.T) {
	term, every := isTerminal, progressEvery
	defer func() { isTerminal, progressEvery = term, every }()
	isTerminal = func(io.Writer) bool { return true }
	progressEvery = 0
	var log bytes.Buffer
	x := NewSpec("governing")
	x.Params = []Param{{Name: "ebn0_db", Values: []float64{0}}}
	x.Build = progressLink
	x.Rules = []stop.Rule{stop.Errors(5).Tap(link.TapFER), stop.Bits(1e6), stop.Below(1e-9).Tap(link.TapFER)}
	r, err := Execute(&x, &Options{Log: &log, Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	out := log.String()
	for _, want := range []string{"fer errors ", "/5 of ", "fer_trials=5 fer_errors=5 fer=1"} {
		if !strings.Contains(out, want) {
			t.Errorf("log lacks %q:\n%q", want, out)
		}
	}
	if !slices.Equal(r.Shown, []string{link.TapFER}) || len(r.Specs) != 1 || r.Specs[0].Rule != "below" || r.Specs[0].Rate != 1e-9 {
		t.Errorf("shown %v, specs %+v", r.Shown, r.Specs)
	}
}
