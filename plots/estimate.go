package plots

import (
	"image/color"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"tally/runtime/result"
)

// Points estimated with weights are marked around their dot: a square for importance
// sampling, a triangle for the semi-analytic estimator, and a cross over either when the
// weights degenerated (the interval is not to be read as precise).
var (
	importanceShape = draw.SquareGlyph{}
	semiShape       = draw.TriangleGlyph{}
	degenerateShape = draw.CrossGlyph{}
)

func estimatorShape(t result.Tap) draw.GlyphDrawer {
	switch t.Estimator {
	case "importance-sampling":
		return importanceShape
	case "semi-analytic":
		return semiShape
	}
	return nil
}

// marks draws a glyph per point, each its own shape (nil: none).
type marks struct {
	x, y   []float64
	shapes []draw.GlyphDrawer
	cl     color.Color
}

func (m *marks) Plot(c draw.Canvas, p *plot.Plot) {
	tx, ty := p.Transforms(&c)
	for i := range m.x {
		if m.shapes[i] != nil && m.y[i] > 0 {
			c.DrawGlyph(draw.GlyphStyle{Color: m.cl, Radius: vg.Points(5), Shape: m.shapes[i]}, vg.Point{X: tx(m.x[i]), Y: ty(m.y[i])})
		}
	}
}

// estimatorMarks marks a curve's weighted points of tap t, or nil when it has none.
func estimatorMarks(pts []result.Point, t int, cl color.Color) *marks {
	m := &marks{cl: cl}
	any := false
	for _, p := range pts {
		if t >= len(p.Taps) || !p.Taps[t].Weighted() {
			continue
		}
		tp := p.Taps[t]
		any = true
		m.x = append(m.x, p.Values[0])
		m.y = append(m.y, tp.Rate)
		m.shapes = append(m.shapes, estimatorShape(tp))
		if tp.Degenerate {
			m.x = append(m.x, p.Values[0])
			m.y = append(m.y, tp.Rate)
			m.shapes = append(m.shapes, degenerateShape)
		}
	}
	if !any {
		return nil
	}
	return m
}

// addEstimatorKeys puts the marks used in the legend.
func addEstimatorKeys(l *Legend, r *result.Run, t int) {
	if t < 0 {
		return
	}
	seen := map[string]bool{}
	for _, p := range r.Points {
		if t < len(p.Taps) && p.Taps[t].Weighted() && !math.IsNaN(p.Taps[t].Rate) {
			tp := p.Taps[t]
			seen[tp.Estimator] = true
			if tp.Degenerate {
				seen["degenerate"] = true
			}
		}
	}
	sty := func(s draw.GlyphDrawer) boundKey {
		return boundKey{draw.GlyphStyle{Color: theoryCl, Radius: vg.Points(5), Shape: s}}
	}
	if seen["importance-sampling"] {
		l.Add("importance sampling", sty(importanceShape))
	}
	if seen["semi-analytic"] {
		l.Add("semi-analytic", sty(semiShape))
	}
	if seen["degenerate"] {
		l.Add("weights degenerated", sty(degenerateShape))
	}
}
