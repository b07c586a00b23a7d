package plots

import (
	"fmt"
	"math"
	"math/cmplx"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Constellation draws received samples in the complex plane, with the ideal points (the
// modulator's constellation; nil for none) marked over them: a look at what the receiver saw
// at one point of a sweep. Both axes share one scale so circles stay round.
func Constellation(title string, received, ideal []complex128) *Figure {
	p := panel(nil, "quadrature")
	p.X.Label.Text = "in-phase"
	reach := 0.0
	for _, s := range received {
		if !cmplx.IsNaN(s) && !cmplx.IsInf(s) {
			reach = math.Max(reach, math.Max(math.Abs(real(s)), math.Abs(imag(s))))
		}
	}
	for _, s := range ideal {
		reach = math.Max(reach, math.Max(math.Abs(real(s)), math.Abs(imag(s))))
	}
	if reach == 0 {
		reach = 1
	}
	reach *= 1.08
	p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = -reach, reach, -reach, reach
	// Translucent dots: dense clouds darken where samples pile up.
	alpha := math.Min(0.6, math.Max(0.08, 400/float64(len(received)+1)))
	p.Add(cloud{pts: received, sty: draw.GlyphStyle{Color: faded(colour(0), alpha), Radius: vg.Points(1.1), Shape: draw.CircleGlyph{}}})
	p.Add(cloud{pts: ideal, sty: draw.GlyphStyle{Color: colour(1), Radius: vg.Points(3.5), Shape: draw.PlusGlyph{}}})
	l := &Legend{}
	l.Add(fmt.Sprintf("received (%d)", len(received)), boundKey{draw.GlyphStyle{Color: colour(0), Radius: vg.Points(1.8), Shape: draw.CircleGlyph{}}})
	if len(ideal) > 0 {
		l.Add("ideal points", boundKey{draw.GlyphStyle{Color: colour(1), Radius: vg.Points(3.5), Shape: draw.PlusGlyph{}}})
	}
	return &Figure{Title: title, Panels: []*plot.Plot{p}, Legend: l, Width: 6.3 * vg.Inch, Height: 5.2 * vg.Inch}
}

// cloud draws a glyph per sample.
type cloud struct {
	pts []complex128
	sty draw.GlyphStyle
}

func (s cloud) Plot(c draw.Canvas, p *plot.Plot) {
	tx, ty := p.Transforms(&c)
	for _, z := range s.pts {
		c.DrawGlyph(s.sty, vg.Point{X: tx(real(z)), Y: ty(imag(z))})
	}
}
