package plots

import (
	"cmp"
	"math"
	"slices"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// known are axis names for the trade's usual parameter names.
var known = map[string]string{
	"ebn0_db":  "Eb/N0 (dB)",
	"esn0_db":  "Es/N0 (dB)",
	"snr_db":   "SNR (dB)",
	"cn0_dbhz": "C/N0 (dB-Hz)",
	"sir_db":   "SIR (dB)",
	"ebn0":     "Eb/N0",
	"esn0":     "Es/N0",
	"snr":      "SNR",
}

// AxisLabel is the axis title for a swept parameter: the trade's name for the usual ones
// (ebn0_db → "Eb/N0 (dB)"), otherwise the name with spaces, and a unit from a known suffix
// (_db → "(dB)", _hz → "(Hz)", _deg → "(°)", _ppm → "(ppm)").
func AxisLabel(param string) string {
	if s, ok := known[strings.ToLower(param)]; ok {
		return s
	}
	units := []struct{ suffix, unit string }{
		{"_dbhz", "dB-Hz"}, {"_dbm", "dBm"}, {"_dbc", "dBc"}, {"_db", "dB"}, {"_khz", "kHz"},
		{"_mhz", "MHz"}, {"_hz", "Hz"}, {"_deg", "°"}, {"_rad", "rad"}, {"_ppm", "ppm"},
		{"_ns", "ns"}, {"_us", "µs"}, {"_ms", "ms"}, {"_s", "s"},
	}
	name, unit := param, ""
	lower := strings.ToLower(param)
	for _, u := range units {
		if strings.HasSuffix(lower, u.suffix) && len(param) > len(u.suffix) {
			name, unit = param[:len(param)-len(u.suffix)], u.unit
			break
		}
	}
	name = strings.ReplaceAll(name, "_", " ")
	if unit != "" {
		return name + " (" + unit + ")"
	}
	return name
}

// ValueLabel names one value of a parameter for a legend: "backoff 1.5 dB", "Eb/N0 4 dB",
// "code 1/2" (value as the table shows it).
func ValueLabel(param, value string) string {
	l := AxisLabel(param)
	if i := strings.LastIndex(l, " ("); i > 0 && strings.HasSuffix(l, ")") {
		unit := l[i+2 : len(l)-1]
		if unit == "°" {
			return l[:i] + " " + value + unit
		}
		return l[:i] + " " + value + " " + unit
	}
	return l + " " + value
}

// sweepTicks marks every swept value, labelled in its shortest exact form, when there are
// few enough to mark (else nil: the default ticks). Labels are thinned at drawing time so
// that no two overlap (see sweepTicker).
func sweepTicks(values []float64) plot.Ticker {
	seen := map[float64]bool{}
	t := &sweepTicker{font: sans(8.5)}
	for _, v := range values {
		if !seen[v] {
			seen[v] = true
			t.ticks = append(t.ticks, plot.Tick{Value: v, Label: strconv.FormatFloat(v, 'g', -1, 64)})
		}
	}
	if len(t.ticks) > 60 {
		return nil
	}
	slices.SortFunc(t.ticks, func(a, b plot.Tick) int { return cmp.Compare(a.Value, b.Value) })
	return t
}

// sweepTicker is a tick at every swept value; it labels every k-th one, k the smallest stride
// at which neighbouring labels keep a gap on an axis width wide (the rest stay as minor
// ticks). Figure.draw sets width to a lower bound of the panel's data width before drawing;
// with width 0 every tick is labelled.
type sweepTicker struct {
	ticks []plot.Tick
	font  font.Font
	width vg.Length
}

// labelGap is the least space between two tick labels.
const labelGap = vg.Length(4)

func (s *sweepTicker) Ticks(lo, hi float64) []plot.Tick {
	t := slices.Clone(s.ticks)
	if s.width <= 0 || hi <= lo || len(t) < 2 {
		return t
	}
	st := textStyle(s.font, ink)
	x := func(v float64) vg.Length { return vg.Length((v-lo)/(hi-lo)) * s.width }
	fits := func(k int) bool {
		for i := 0; i+k < len(t); i += k {
			a, b := t[i], t[i+k]
			if x(b.Value)-x(a.Value) < (st.Width(a.Label)+st.Width(b.Label))/2+labelGap {
				return false
			}
		}
		return true
	}
	k := 1
	for ; k < len(t) && !fits(k); k++ {
	}
	for i := range t {
		if i%k != 0 {
			t[i].Label = ""
		}
	}
	return t
}

// Decade labels are drawn by decadeLabels, as 10 with a raised exponent: the fonts' superscript
// digits lack a minus sign. The ticks themselves carry a blank label, which keeps them major
// (gridded) while the axis leaves room for the drawn labels through its label padding.
const blank = " "

// decadeTicks marks every decade between lo and hi (powers of ten), with minor ticks at 2…9
// times each.
type decadeTicks struct{}

func (decadeTicks) Ticks(lo, hi float64) []plot.Tick {
	e0, e1 := int(math.Floor(math.Log10(lo)+1e-9)), int(math.Ceil(math.Log10(hi)-1e-9))
	var t []plot.Tick
	for e := e0; e <= e1; e++ {
		v := math.Pow(10, float64(e))
		t = append(t, plot.Tick{Value: v, Label: blank})
		if e < e1 {
			for m := 2; m <= 9; m++ {
				t = append(t, plot.Tick{Value: float64(m) * v})
			}
		}
	}
	return t
}

// decadeRange widens [lo, hi] to whole decades.
func decadeRange(lo, hi float64) (float64, float64) {
	a := math.Pow(10, math.Floor(math.Log10(lo)+1e-9))
	b := math.Pow(10, math.Ceil(math.Log10(hi)-1e-9))
	if b <= a {
		b = a * 10
	}
	return a, b
}

// labelTicks puts the names of a labelled parameter (SweepLabels) at 0, 1, 2, ….
func labelTicks(names []string) plot.ConstantTicks {
	t := make(plot.ConstantTicks, len(names))
	for i, n := range names {
		t[i] = plot.Tick{Value: float64(i), Label: n}
	}
	return t
}

// decadeLabels writes the labels of a log axis's decades left of the data area: "1", "10",
// or 10 with the exponent raised. Past eight decades only every other one is labelled.
type decadeLabels struct{}

var (
	baseFont = sans(8.5)
	expFont  = sans(6.5)
)

// width is the room the labels of p's decades need.
func (decadeLabels) width(lo, hi float64) vg.Length {
	w := vg.Length(0)
	for _, e := range labelledDecades(lo, hi) {
		b, x := decadeParts(e)
		w = max(w, textStyle(baseFont, ink).Width(b)+textStyle(expFont, ink).Width(x))
	}
	return w
}

func (decadeLabels) Plot(c draw.Canvas, p *plot.Plot) {
	_, ty := p.Transforms(&c)
	base, exp := textStyle(baseFont, ink), textStyle(expFont, ink)
	base.XAlign, exp.XAlign = draw.XRight, draw.XRight
	base.YAlign, exp.YAlign = draw.YCenter, draw.YCenter
	right := c.Min.X - p.Y.Tick.Length - vg.Points(3)
	for _, e := range labelledDecades(p.Y.Min, p.Y.Max) {
		y := ty(math.Pow(10, float64(e)))
		b, x := decadeParts(e)
		if x == "" {
			c.FillText(base, vg.Point{X: right, Y: y}, b)
			continue
		}
		c.FillText(exp, vg.Point{X: right, Y: y + baseFont.Size*0.42}, x)
		c.FillText(base, vg.Point{X: right - exp.Width(x), Y: y}, b)
	}
}

// decadeParts splits the label of 10^e into base and raised exponent (with a true minus).
func decadeParts(e int) (string, string) {
	switch e {
	case 0:
		return "1", ""
	case 1:
		return "10", ""
	}
	return "10", strings.Replace(strconv.Itoa(e), "-", "\u2212", 1)
}

func labelledDecades(lo, hi float64) []int {
	e0, e1 := int(math.Floor(math.Log10(lo)+1e-9)), int(math.Ceil(math.Log10(hi)-1e-9))
	step := 1
	if e1-e0 > 8 {
		step = 2
	}
	var es []int
	for e := e1; e >= e0; e -= step {
		es = append(es, e)
	}
	return es
}
