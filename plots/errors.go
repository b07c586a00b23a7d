package plots

import (
	"image/color"
	"math"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// ErrorTrace is what the error plot of a counted capture shows: the errors in each interval of
// the capture, where the alignment slipped, and the stretches of unavailable time.
type ErrorTrace struct {
	Title, Caption string
	XLabel         string       // "time (s)" or "capture bit"
	YLabel         string       // default "errors per interval"
	From, To       []float64    // each interval's extent on the x axis
	Errors         []int64      // errors in each interval
	Lost           []bool       // the interval holds bits not compared
	Slips          []float64    // x of each change of alignment
	SlipLabels     []string     // a short label per slip ("+1", "−1", "lost")
	Unavailable    [][2]float64 // x extents of unavailable time
}

// Errors draws an error trace: a bar per interval up to its error count on a logarithmic
// axis (an interval without errors has no bar), slips as dashed vertical lines labelled with
// their shift, intervals with bits not compared marked at the top, unavailable time shaded.
func Errors(t ErrorTrace) *Figure {
	yl := t.YLabel
	if yl == "" {
		yl = "errors per interval"
	}
	p := panel(nil, yl)
	p.X.Label.Text = t.XLabel
	lo, hi := math.Inf(1), math.Inf(-1)
	for i := range t.From {
		lo, hi = math.Min(lo, t.From[i]), math.Max(hi, t.To[i])
	}
	if math.IsInf(lo, 1) {
		lo, hi = 0, 1
	}
	p.X.Min, p.X.Max = lo, hi
	top := int64(1)
	for _, e := range t.Errors {
		top = max(top, e)
	}
	p.Y.Scale = plot.LogScale{}
	p.Y.Min = 0.5
	p.Y.Max = math.Pow(10, math.Ceil(math.Log10(float64(top))+1e-9)+0.3)
	p.Y.Tick.Marker = countTicks{}
	legend := &Legend{}
	shade := faded(palette[4], 0.18)
	if len(t.Unavailable) > 0 {
		p.Add(spans{t.Unavailable, shade})
		legend.Add("unavailable time", swatch{shade})
	}
	bars := &errorBars{t: t, line: draw.LineStyle{Color: colour(0), Width: vg.Points(1.2)}}
	p.Add(bars)
	legend.Add("errors in an interval", &series{line: bars.line})
	if hasLost(t.Lost) {
		legend.Add("bits not compared", boundKey{draw.GlyphStyle{Color: palette[6], Radius: vg.Points(2.4), Shape: draw.BoxGlyph{}}})
	}
	if len(t.Slips) > 0 {
		sl := draw.LineStyle{Color: palette[1], Width: vg.Points(1), Dashes: theoryDashes[0]}
		p.Add(slipLines{x: t.Slips, labels: t.SlipLabels, line: sl})
		legend.Add("slip (shift in bits)", &series{line: sl})
	}
	return &Figure{Title: t.Title, Caption: t.Caption, Panels: []*plot.Plot{p}, Legend: legend,
		Width: 9 * vg.Inch, Height: 4.2 * vg.Inch}
}

func hasLost(l []bool) bool {
	for _, v := range l {
		if v {
			return true
		}
	}
	return false
}

// countTicks marks 1, 10, 100, … with plain labels, and 2…9 times each as minor ticks.
type countTicks struct{}

func (countTicks) Ticks(lo, hi float64) []plot.Tick {
	var t []plot.Tick
	for v := 1.0; v <= hi; v *= 10 {
		t = append(t, plot.Tick{Value: v, Label: strconv.FormatFloat(v, 'f', 0, 64)})
		for m := 2.0; m <= 9; m++ {
			if m*v <= hi {
				t = append(t, plot.Tick{Value: m * v})
			}
		}
	}
	return t
}

type errorBars struct {
	t    ErrorTrace
	line draw.LineStyle
}

func (b *errorBars) Plot(c draw.Canvas, p *plot.Plot) {
	tx, ty := p.Transforms(&c)
	lost := draw.GlyphStyle{Color: palette[6], Radius: vg.Points(2.4), Shape: draw.BoxGlyph{}}
	for i := range b.t.From {
		x := tx((b.t.From[i] + b.t.To[i]) / 2)
		if e := b.t.Errors[i]; e > 0 {
			c.StrokeLines(b.line, c.ClipLinesY([]vg.Point{{X: x, Y: c.Min.Y}, {X: x, Y: ty(float64(e))}})...)
		}
		if i < len(b.t.Lost) && b.t.Lost[i] {
			c.DrawGlyph(lost, vg.Point{X: x, Y: c.Max.Y - vg.Points(5)})
		}
	}
}

func (b *errorBars) Thumbnail(c *draw.Canvas) {
	y := c.Center().Y
	c.StrokeLine2(b.line, c.Min.X, y, c.Max.X, y)
}

type slipLines struct {
	x      []float64
	labels []string
	line   draw.LineStyle
}

func (s slipLines) Plot(c draw.Canvas, p *plot.Plot) {
	tx, _ := p.Transforms(&c)
	st := textStyle(sans(7.5), s.line.Color)
	st.XAlign = draw.XCenter
	st.YAlign = draw.YTop
	for i, v := range s.x {
		x := tx(v)
		if x < c.Min.X || x > c.Max.X {
			continue
		}
		c.StrokeLine2(s.line, x, c.Min.Y, x, c.Max.Y-vg.Points(12))
		if i < len(s.labels) {
			c.FillText(st, vg.Point{X: x, Y: c.Max.Y - vg.Points(2)}, s.labels[i])
		}
	}
}

type spans struct {
	x  [][2]float64
	cl color.Color
}

func (s spans) Plot(c draw.Canvas, p *plot.Plot) {
	tx, _ := p.Transforms(&c)
	c.SetColor(s.cl)
	for _, v := range s.x {
		x0, x1 := math.Max(float64(tx(v[0])), float64(c.Min.X)), math.Min(float64(tx(v[1])), float64(c.Max.X))
		if x1 <= x0 {
			continue
		}
		r := vg.Rectangle{Min: vg.Point{X: vg.Length(x0), Y: c.Min.Y}, Max: vg.Point{X: vg.Length(x1), Y: c.Max.Y}}
		c.Fill(r.Path())
	}
}

type swatch struct{ cl color.Color }

func (s swatch) Thumbnail(c *draw.Canvas) {
	c.SetColor(s.cl)
	c.Fill(c.Rectangle.Path())
}
