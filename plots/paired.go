package plots

import (
	"image/color"
	"math"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"tally/runtime/result"
)

// pairedPanel is the panel of a paired comparison (sim's Variants): for every variant compared
// with the reference, the ratio of its BER to the reference's on the same frames against the
// x axis, with the ratio's interval, a filled dot where the difference is shown and a ring
// where it is not, over a dashed line at 1 (no difference). Nil when the run compares nothing.
func pairedPanel(r *result.Run, cs []curve, legend *Legend) *plot.Plot {
	if !r.Paired() {
		return nil
	}
	ref := ""
	p := panel(r, "BER ratio to the reference")
	lo, hi := 1.0, 1.0
	for ci, c := range cs {
		s := &series{}
		has := false
		for _, pt := range c.points {
			s.x = append(s.x, pt.Values[0])
			y, low, up := math.NaN(), math.NaN(), math.NaN()
			if cmp := pt.Paired; cmp != nil && cmp.Ratio > 0 && !math.IsInf(cmp.Ratio, 0) {
				has, ref = true, cmp.Against
				y, low, up = cmp.Ratio, math.Max(cmp.RatioLow, 1e-12), cmp.RatioHigh
				if up > hi && !math.IsInf(up, 0) {
					hi = up
				}
				lo = math.Min(lo, cmp.RatioLow)
			}
			s.y, s.low, s.high = append(s.y, y), append(s.low, low), append(s.high, up)
			s.bound = append(s.bound, math.NaN())
		}
		if !has {
			continue
		}
		cl := colour(ci)
		s.line = draw.LineStyle{Color: cl, Width: vg.Points(1.1)}
		p.Add(s, &shownMarks{points: c.points, cl: cl})
	}
	p.Add(&unityLine{y: 1})
	pad := 0.08 * (hi - lo)
	p.Y.Min, p.Y.Max = math.Max(0, lo-pad), hi+pad
	p.Y.Tick.Marker = evenTicks{}
	p.Y.Label.Text = "BER ratio to " + ref
	legend.Add("difference from "+ref+" shown", &series{glyph: draw.GlyphStyle{Color: theoryCl, Radius: vg.Points(3), Shape: draw.CircleGlyph{}}})
	legend.Add("no difference shown", &series{glyph: draw.GlyphStyle{Color: theoryCl, Radius: vg.Points(3), Shape: ring{}}})
	return p
}

// shownMarks marks each compared point: filled where the difference is shown, a ring where not.
type shownMarks struct {
	points []result.Point
	cl     color.Color
}

func (m *shownMarks) Plot(c draw.Canvas, p *plot.Plot) {
	tx, ty := p.Transforms(&c)
	for _, pt := range m.points {
		cmp := pt.Paired
		if cmp == nil || !(cmp.Ratio > 0) || math.IsInf(cmp.Ratio, 0) || cmp.Ratio > p.Y.Max {
			continue
		}
		sty := draw.GlyphStyle{Color: m.cl, Radius: vg.Points(3.2), Shape: ring{}}
		if cmp.Shown {
			sty.Shape = draw.CircleGlyph{}
		}
		c.DrawGlyph(sty, vg.Point{X: tx(pt.Values[0]), Y: ty(cmp.Ratio)})
	}
}

// unityLine is a dashed horizontal line across the panel (ratio 1).
type unityLine struct{ y float64 }

func (l *unityLine) Plot(c draw.Canvas, p *plot.Plot) {
	_, ty := p.Transforms(&c)
	y := ty(l.y)
	c.StrokeLine2(draw.LineStyle{Color: theoryCl, Width: vg.Points(0.8), Dashes: []vg.Length{vg.Points(4), vg.Points(3)}}, c.Min.X, y, c.Max.X, y)
}

// evenTicks marks a linear axis at a round step (1, 2 or 5 times a power of ten) that gives
// four to eight ticks, each labelled with the decimals the step needs, so that a narrow range
// of ratios (0.95 to 1.1) reads as 0.96, 0.98, 1.00 … and never as a rounded label away from
// its tick.
type evenTicks struct{}

func (evenTicks) Ticks(lo, hi float64) []plot.Tick {
	if !(hi > lo) {
		return nil
	}
	step := math.Pow(10, math.Floor(math.Log10((hi-lo)/4)))
	for _, m := range []float64{1, 2, 5, 10} {
		if (hi-lo)/(m*step) <= 8 {
			step *= m
			break
		}
	}
	decimals := max(0, int(-math.Floor(math.Log10(step)+1e-9)))
	var ticks []plot.Tick
	for v := math.Ceil(lo/step-1e-9) * step; v <= hi+1e-9*step; v += step {
		ticks = append(ticks, plot.Tick{Value: v, Label: strconv.FormatFloat(v, 'f', decimals, 64)})
	}
	return ticks
}
