package plots

import (
	"math"
	"slices"
	"strings"
	"testing"

	"tally/runtime/result"
)

// A target is drawn as a line in the panel of its tap, labelled with its rate, and each
// curve's crossing is marked with its value in the axis's unit; neighbouring crossings put
// their labels on opposite sides. A target on the frame error rate goes to the FER panel, and
// a stop.Below spec is a line of its own (common practice, no source: a spec line on a BER
// plot is how a requirement is shown against the measured curve).
func TestTargetLines(t *testing.T) {
	r := sampleRun(true, true)
	r.Targets = []result.Target{
		{Tap: "ber", Rate: 1e-5, Curve: "backoff_db=0", Found: true, X: 9.58, Low: 9.5, High: 9.66, Unit: "dB"},
		{Tap: "ber", Rate: 1e-5, Curve: "backoff_db=1.5", Found: true, X: 9.9, Low: 9.7, High: math.Inf(1), Unit: "dB"},
		{Tap: "ber", Rate: 1e-5, Curve: "backoff_db=3", Found: false, Note: "not reached"},
		{Tap: "fer", Rate: 1e-2, Curve: "backoff_db=0", Found: true, X: 6.5, Low: 6.4, High: 6.6, Unit: "dB"},
	}
	r.Specs = []result.Spec{{Tap: "ber", Rate: 1e-6, Rule: "below"}}
	cs := curves(r)
	left := levelLines(r, cs, leftTaps(r), false)
	if len(left) != 2 || left[0].label != "target ber 1e-5" || left[1].label != "spec: ber below 1e-6" {
		t.Fatalf("left panel lines %+v", left)
	}
	cr := left[0].cross
	if len(cr) != 2 || cr[0].text != "9.58 dB" || cr[1].text != "9.90 dB" || cr[0].below || !cr[1].below {
		t.Errorf("crossings %+v: want 9.58 dB above, 9.90 dB below", cr)
	}
	if cr[0].cl != colour(0) || cr[1].cl != colour(1) {
		t.Error("a crossing is not drawn in its curve's colour")
	}
	if !math.IsInf(cr[1].high, 1) {
		t.Error("an open end lost")
	}
	right := levelLines(r, cs, leftTaps(r), true)
	if len(right) != 1 || right[0].rate != 1e-2 || right[0].label != "target 0.01" || len(right[0].cross) != 1 {
		t.Errorf("FER panel lines %+v", right)
	}
	f, err := BER(r)
	if err != nil {
		t.Fatal(err)
	}
	svg, err := f.SVG()
	if err != nil {
		t.Fatal(err)
	}
	texts, _ := svgTexts(t, svg)
	// Only a target on the frame error rate: the legend still names the lines.
	fr := sampleRun(false, true)
	fr.Targets = []result.Target{{Tap: "fer", Rate: 1e-2, Found: true, X: 6.5, Low: 6.4, High: 6.6, Unit: "dB"}}
	ff, err := BER(fr)
	if err != nil {
		t.Fatal(err)
	}
	fsvg, err := ff.SVG()
	if err != nil {
		t.Fatal(err)
	}
	if ftexts, _ := svgTexts(t, fsvg); !has(ftexts, "target, crossing") || !has(ftexts, "6.50 dB") {
		t.Error("a target on the FER alone: no legend entry or no crossing")
	}
	for _, want := range []string{"target ber 1e-5", "9.58 dB", "9.90 dB", "spec: ber below 1e-6", "target 0.01", "6.50 dB", "target, crossing"} {
		if !has(texts, want) {
			t.Errorf("ber.svg lacks the text %q", want)
		}
	}
}

// The left panel draws the shown taps (the governing one first), the FER keeps its panel, and
// a run that shows only the FER keeps the BER and its pre-decoder companion beside it.
func TestLeftTaps(t *testing.T) {
	r := sampleRun(false, true)
	r.Taps = append(r.Taps, "payload")
	for _, c := range []struct {
		shown, want []string
		label       string
	}{
		{nil, []string{"ber", "pre"}, "bit error rate"},
		{[]string{"fer"}, []string{"ber", "pre"}, "bit error rate"},
		{[]string{"payload"}, []string{"payload"}, "payload error rate"},
		{[]string{"payload", "ber"}, []string{"payload", "ber", "pre"}, "error rate"},
		{[]string{"missing"}, []string{"ber", "pre"}, "bit error rate"},
	} {
		r.Shown = c.shown
		got := leftTaps(r)
		if !slices.Equal(got, c.want) || leftLabel(got) != c.label {
			t.Errorf("shown %v: left panel %v %q, want %v %q", c.shown, got, leftLabel(got), c.want, c.label)
		}
	}
}

// A run that shows the script's payload tap draws it, named, and not the whole-frame BER.
func TestPlotShowsPayload(t *testing.T) {
	r := sampleRun(false, false)
	r.Taps = append(r.Taps, "payload")
	for i := range r.Points {
		p := &r.Points[i]
		pay := p.Taps[0]
		pay.Name = "payload"
		p.Taps = append(p.Taps, pay)
		p.Taps[0].Errors, p.Taps[0].Rate, p.Taps[0].Low, p.Taps[0].High = 1700, 1.7e-3, 1.6e-3, 1.8e-3 // a floor
	}
	r.Shown = []string{"payload"}
	f, err := BER(r)
	if err != nil {
		t.Fatal(err)
	}
	svg, _ := f.SVG()
	texts, _ := svgTexts(t, svg)
	if !has(texts, "simulated payload") || !has(texts, "payload error rate") || has(texts, "simulated BER") {
		t.Errorf("texts %s: want the payload curve only", strings.Join(texts, " | "))
	}
}
