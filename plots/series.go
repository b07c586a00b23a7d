package plots

import (
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// series is one curve: a polyline through the points that have a value (NaN breaks it),
// optional interval bars, markers, and upper-bound markers for points with no errors.
type series struct {
	x, y      []float64 // NaN y: no point here
	low, high []float64 // interval per point (nil: no bars)
	bound     []float64 // upper bound of a point with no errors (NaN: none)
	line      draw.LineStyle
	glyph     draw.GlyphStyle // zero Shape: no markers
	boundSty  draw.GlyphStyle
}

func (s *series) Plot(c draw.Canvas, p *plot.Plot) {
	tx, ty := p.Transforms(&c)
	if s.low != nil {
		bar := draw.LineStyle{Color: faded(s.line.Color, 0.55), Width: vg.Points(1.1)}
		capw := vg.Points(2.5)
		for i := range s.x {
			if math.IsNaN(s.y[i]) || !(s.low[i] > 0) {
				continue
			}
			x, lo, hi := tx(s.x[i]), ty(s.low[i]), ty(s.high[i])
			c.StrokeLines(bar, c.ClipLinesY([]vg.Point{{X: x, Y: lo}, {X: x, Y: hi}})...)
			for _, y := range []vg.Length{lo, hi} {
				if y >= c.Min.Y && y <= c.Max.Y {
					c.StrokeLine2(bar, x-capw, y, x+capw, y)
				}
			}
		}
	}
	if s.line.Color != nil && s.line.Width > 0 {
		var run []vg.Point
		flush := func() {
			if len(run) > 1 {
				c.StrokeLines(s.line, c.ClipLinesXY(run)...)
			}
			run = run[:0]
		}
		for i := range s.x {
			if math.IsNaN(s.y[i]) || !(s.y[i] > 0) {
				flush()
				continue
			}
			run = append(run, vg.Point{X: tx(s.x[i]), Y: ty(s.y[i])})
		}
		flush()
	}
	if s.glyph.Shape != nil {
		for i := range s.x {
			if s.y[i] > 0 {
				c.DrawGlyph(s.glyph, vg.Point{X: tx(s.x[i]), Y: ty(s.y[i])})
			}
		}
	}
	for i := range s.bound {
		if s.bound[i] > 0 {
			c.DrawGlyph(s.boundSty, vg.Point{X: tx(s.x[i]), Y: ty(s.bound[i])})
		}
	}
}

// GlyphBoxes keeps markers at the edges from being cut.
func (s *series) GlyphBoxes(p *plot.Plot) []plot.GlyphBox {
	var b []plot.GlyphBox
	add := func(x, y float64, g draw.GlyphStyle) {
		if g.Shape == nil || !(y > 0) || y < p.Y.Min || y > p.Y.Max {
			return
		}
		r := g.Radius * 1.3
		b = append(b, plot.GlyphBox{X: p.X.Norm(x), Y: p.Y.Norm(y), Rectangle: vg.Rectangle{Min: vg.Point{X: -r, Y: -r}, Max: vg.Point{X: r, Y: r}}})
	}
	for i := range s.x {
		add(s.x[i], s.y[i], s.glyph)
		if s.bound != nil {
			add(s.x[i], s.bound[i], s.boundSty)
		}
	}
	return b
}

// Thumbnail draws the legend's sample: a short stretch of line with the marker on it.
func (s *series) Thumbnail(c *draw.Canvas) {
	y := c.Center().Y
	if s.line.Color != nil && s.line.Width > 0 {
		c.StrokeLine2(s.line, c.Min.X, y, c.Max.X, y)
	}
	if s.glyph.Shape != nil {
		c.DrawGlyphNoClip(s.glyph, c.Center())
	}
}

// boundKey is the legend's sample for upper bounds.
type boundKey struct{ sty draw.GlyphStyle }

func (k boundKey) Thumbnail(c *draw.Canvas) { c.DrawGlyphNoClip(k.sty, c.Center()) }

// area fills the data area before anything else is drawn.
type area struct{}

func (area) Plot(c draw.Canvas, _ *plot.Plot) {
	c.SetColor(paper)
	c.Fill(c.Rectangle.Path())
}
