package plots

import (
	"bytes"
	"encoding/xml"
	"fmt"
	"image"
	"image/color"
	"image/png"
	"io"
	"math"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"tally/runtime/result"
)

// svgTexts parses an SVG with encoding/xml (it must be well-formed) and returns its text
// elements and the set of stroke colours of its paths drawn at the curve width.
func svgTexts(t *testing.T, b []byte) (texts []string, curveStrokes map[string]bool) {
	t.Helper()
	d := xml.NewDecoder(bytes.NewReader(b))
	curveStrokes = map[string]bool{}
	stroke := regexp.MustCompile(`stroke:(#[0-9A-F]{6});stroke-width:1.4\b`)
	inText := false
	for {
		tok, err := d.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("SVG does not parse as XML: %v", err)
		}
		switch el := tok.(type) {
		case xml.StartElement:
			inText = el.Name.Local == "text"
			for _, a := range el.Attr {
				if a.Name.Local == "style" && el.Name.Local == "path" {
					if m := stroke.FindStringSubmatch(a.Value); m != nil {
						curveStrokes[m[1]] = true
					}
				}
			}
		case xml.CharData:
			if inText {
				texts = append(texts, string(el))
			}
		case xml.EndElement:
			inText = false
		}
	}
	return texts, curveStrokes
}

func hex(c color.NRGBA) string { return fmt.Sprintf("#%02X%02X%02X", c.R, c.G, c.B) }

func has(texts []string, s string) bool {
	for _, t := range texts {
		if t == s {
			return true
		}
	}
	return false
}

func TestBERSVGSeries(t *testing.T) {
	for _, c := range []struct {
		grid, coded bool
		curves      int
		legend      []string
		frames      bool
	}{
		{false, false, 1, []string{"simulated BER", "theory: bpsk", "no errors: 95 % upper bound"}, false},
		{true, false, 3, []string{"backoff 0 dB", "backoff 1.5 dB", "backoff 3 dB", "theory: bpsk"}, false},
		{false, true, 1, []string{"simulated BER", "pre-decoder BER", "simulated FER"}, true},
	} {
		f, err := BER(sampleRun(c.grid, c.coded))
		if err != nil {
			t.Fatal(err)
		}
		b, err := f.SVG()
		if err != nil {
			t.Fatal(err)
		}
		texts, strokes := svgTexts(t, b)
		// One curve colour per value of the second parameter; the next palette colour unused.
		for i := 0; i < c.curves; i++ {
			if !strokes[hex(palette[i])] {
				t.Errorf("grid=%v: no curve in colour %d (%s); strokes %v", c.grid, i, hex(palette[i]), strokes)
			}
		}
		if strokes[hex(palette[c.curves])] {
			t.Errorf("grid=%v: more than %d curves", c.grid, c.curves)
		}
		for _, l := range c.legend {
			if !has(texts, l) {
				t.Errorf("grid=%v coded=%v: legend lacks %q (texts %q)", c.grid, c.coded, l, texts)
			}
		}
		if has(texts, "frame error rate") != c.frames {
			t.Errorf("coded=%v: frame panel shown = %v", c.coded, !c.frames)
		}
		for _, want := range []string{"Eb/N0 (dB)", "bit error rate", "sensor uplink"} {
			if !has(texts, want) {
				t.Errorf("no %q in the SVG", want)
			}
		}
	}
}

// countColour counts the pixels of exactly colour c.
func countColour(img image.Image, c color.NRGBA) int {
	n := 0
	b := img.Bounds()
	for y := b.Min.Y; y < b.Max.Y; y++ {
		for x := b.Min.X; x < b.Max.X; x++ {
			if color.NRGBAModel.Convert(img.At(x, y)).(color.NRGBA) == c {
				n++
			}
		}
	}
	return n
}

func TestBERPNGDecodes(t *testing.T) {
	f, err := BER(sampleRun(true, false))
	if err != nil {
		t.Fatal(err)
	}
	b, err := f.PNG()
	if err != nil {
		t.Fatal(err)
	}
	img, err := png.Decode(bytes.NewReader(b))
	if err != nil {
		t.Fatalf("PNG does not decode: %v", err)
	}
	// 7.2 × 4.6 inches at 150 dpi.
	if got := img.Bounds().Size(); got != (image.Point{1080, 690}) {
		t.Errorf("PNG is %v pixels, want 1080×690", got)
	}
	// Three curves: the first three palette colours fill their markers; the fourth is absent.
	for i := 0; i < 3; i++ {
		if n := countColour(img, palette[i]); n < 50 {
			t.Errorf("colour %d: %d pixels, want a curve's worth", i, n)
		}
	}
	if n := countColour(img, palette[3]); n != 0 {
		t.Errorf("colour 3 (no fourth curve) has %d pixels", n)
	}
}

// The same run gives the same bytes: no time, no random identifier in either file.
func TestBERDeterministic(t *testing.T) {
	var svgs, pngs [2][]byte
	for i := range 2 {
		f, err := BER(sampleRun(true, true))
		if err != nil {
			t.Fatal(err)
		}
		if svgs[i], err = f.SVG(); err != nil {
			t.Fatal(err)
		}
		if pngs[i], err = f.PNG(); err != nil {
			t.Fatal(err)
		}
	}
	if !bytes.Equal(svgs[0], svgs[1]) {
		t.Error("SVG differs between two drawings of the same run")
	}
	if !bytes.Equal(pngs[0], pngs[1]) {
		t.Error("PNG differs between two drawings of the same run")
	}
}

// A point with no errors is drawn at its interval's upper bound, not at zero (which a log axis
// cannot show) and without a bar.
func TestZeroErrorsDrawnAsBound(t *testing.T) {
	r := sampleRun(false, false)
	s := tapSeries(r.Points, 0)
	for i, p := range r.Points {
		tp := p.Taps[0]
		switch {
		case tp.Errors == 0:
			if !math.IsNaN(s.y[i]) || s.bound[i] != tp.High || !(tp.High > 0) {
				t.Errorf("point %d (0 errors): y %v bound %v, want NaN and %v", i, s.y[i], s.bound[i], tp.High)
			}
		default:
			if s.y[i] != tp.Rate || s.low[i] != tp.Low || s.high[i] != tp.High || !math.IsNaN(s.bound[i]) {
				t.Errorf("point %d: series %v [%v, %v] bound %v, tap %+v", i, s.y[i], s.low[i], s.high[i], s.bound[i], tp)
			}
		}
	}
}

func TestNothingToDraw(t *testing.T) {
	r := &result.Run{Params: []string{"ebn0_db"}, Taps: []string{"ber", "fer"},
		Points: []result.Point{{Values: []float64{0}, Taps: []result.Tap{{Name: "ber"}, {Name: "fer"}}}}}
	if f, err := BER(r); f != nil || err != nil {
		t.Errorf("a run that counted nothing drew %v, %v", f, err)
	}
}

// A labelled parameter (SweepLabels) on the x axis puts its names at 0, 1, 2.
func TestLabelledAxis(t *testing.T) {
	r := sampleRun(false, false)
	r.Params[0] = "modem"
	r.Labels = [][]string{{"BPSK", "QPSK", "8-PSK"}}
	r.Points = r.Points[:3]
	for i := range r.Points {
		r.Points[i].Values = []float64{float64(i)}
	}
	f, err := BER(r)
	if err != nil {
		t.Fatal(err)
	}
	b, err := f.SVG()
	if err != nil {
		t.Fatal(err)
	}
	texts, _ := svgTexts(t, b)
	for _, want := range []string{"BPSK", "QPSK", "8-PSK", "modem"} {
		if !has(texts, want) {
			t.Errorf("no %q on the axis", want)
		}
	}
}

func TestAxisLabel(t *testing.T) {
	for in, want := range map[string]string{
		"ebn0_db":    "Eb/N0 (dB)",
		"EbN0_dB":    "Eb/N0 (dB)",
		"backoff_db": "backoff (dB)",
		"phase_deg":  "phase (°)",
		"cfo_hz":     "cfo (Hz)",
		"rolloff":    "rolloff",
		"adc_bits":   "adc bits",
	} {
		if got := AxisLabel(in); got != want {
			t.Errorf("AxisLabel(%q) = %q, want %q", in, got, want)
		}
	}
	if got := ValueLabel("backoff_db", "1.5"); got != "backoff 1.5 dB" {
		t.Errorf("ValueLabel = %q", got)
	}
	if got := ValueLabel("code", "1/2"); got != "code 1/2" {
		t.Errorf("ValueLabel = %q", got)
	}
}

// Decade ticks: one labelled (major) tick per power of ten and eight minor ones between.
func TestDecadeTicks(t *testing.T) {
	ticks := decadeTicks{}.Ticks(1e-6, 1e-1)
	var major, minor int
	for _, tk := range ticks {
		if tk.IsMinor() {
			minor++
			continue
		}
		major++
		if e := math.Log10(tk.Value); math.Abs(e-math.Round(e)) > 1e-9 {
			t.Errorf("major tick at %g, not a power of ten", tk.Value)
		}
	}
	if major != 6 || minor != 5*8 {
		t.Errorf("%d major and %d minor ticks over 10⁻⁶…10⁻¹, want 6 and 40", major, minor)
	}
	if lo, hi := decadeRange(3.2e-6, 0.08); lo != 1e-6 || math.Abs(hi-0.1) > 1e-17 {
		t.Errorf("decadeRange = %g, %g", lo, hi)
	}
	if got := labelledDecades(1e-12, 1); len(got) != 7 || got[0] != 0 || got[6] != -12 {
		t.Errorf("past eight decades every other is labelled: %v", got)
	}
	b, x := decadeParts(-5)
	if b+x != "10\u22125" || strings.Contains(x, "-") {
		t.Errorf("decadeParts(-5) = %q, %q: want a true minus sign", b, x)
	}
}

// A theory curve drawn once per curve in that curve's colour has a legend key in the same
// colours (one segment per curve), not a grey line the plot never draws; a single curve keeps
// the neutral colour for both.
func TestTheoryKeyMatchesItsLines(t *testing.T) {
	for _, grid := range []bool{false, true} {
		f, err := BER(sampleRun(grid, false))
		if err != nil {
			t.Fatal(err)
		}
		var key lineKey
		found := false
		for i, n := range f.Legend.names {
			if n == "theory: bpsk" {
				key, found = f.Legend.thumbs[i].(lineKey)
			}
		}
		if !found {
			t.Fatalf("grid=%v: no lineKey for theory: bpsk in %q", grid, f.Legend.names)
		}
		// The lines are drawn in theoryColour(ci, many): the key must show the same colours.
		want := []color.Color{theoryCl}
		if grid {
			want = []color.Color{colour(0), colour(1), colour(2)}
		}
		if len(key.styles) != len(want) {
			t.Fatalf("grid=%v: key of %d colours, %d lines drawn", grid, len(key.styles), len(want))
		}
		for i, s := range key.styles {
			if s.Color != want[i] || s.Color != theoryColour(i, grid) {
				t.Errorf("grid=%v: key colour %d is %v, the line's %v", grid, i, s.Color, want[i])
			}
		}
	}
}

// The typed surface's unnamed theory column ("theory") is labelled plainly, not "theory: theory".
func TestBERUnnamedTheoryLabel(t *testing.T) {
	run := sampleRun(true, false)
	run.Theory = []string{"theory"}
	f, err := BER(run)
	if err != nil {
		t.Fatal(err)
	}
	b, err := f.SVG()
	if err != nil {
		t.Fatal(err)
	}
	texts, _ := svgTexts(t, b)
	if has(texts, "theory: theory") || !has(texts, "theory") {
		t.Errorf("legend texts %q: want a plain \"theory\"", texts)
	}
}

// A crossing that rounds to zero is labelled without a sign on the plot as in README.md
// (result.AxisValue; common practice, no source).
func TestCrossTextUnsigned(t *testing.T) {
	for x, want := range map[float64]string{-0.003: "0.00 dB", 9.555: "9.55 dB", -1.2: "-1.20 dB"} {
		if got := crossText(x, "dB"); got != want {
			t.Errorf("crossText(%g) = %q, want %q", x, got, want)
		}
	}
}

// The ratio panel's ticks are labelled with the decimals their step needs: every label is its
// tick's value (a narrow range, 0.946 to 1.12, read "1" at 1.03 with rounded labels).
func TestEvenTicks(t *testing.T) {
	for _, r := range [][2]float64{{0.946, 1.12}, {0.7, 1.15}, {0, 3.2}, {0.99, 1.004}} {
		ticks := evenTicks{}.Ticks(r[0], r[1])
		if len(ticks) < 3 || len(ticks) > 9 {
			t.Errorf("%v: %d ticks", r, len(ticks))
		}
		for _, tk := range ticks {
			v, err := strconv.ParseFloat(tk.Label, 64)
			if err != nil || math.Abs(v-tk.Value) > 1e-9 || tk.Value < r[0] || tk.Value > r[1] {
				t.Errorf("%v: tick %g labelled %q", r, tk.Value, tk.Label)
			}
		}
	}
}
