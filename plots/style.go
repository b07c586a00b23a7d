package plots

import (
	"image/color"
	"math"

	xfont "golang.org/x/image/font"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// palette holds the curve colours, in order of use: dark, saturated and far apart in hue, so
// curves stay apart on screen and in greyscale print (lightness steps alternate).
var palette = []color.NRGBA{
	{0x1f, 0x5f, 0x7a, 0xff}, // deep sea blue
	{0xc8, 0x55, 0x1b, 0xff}, // rust
	{0x4f, 0x7d, 0x2a, 0xff}, // moss
	{0x86, 0x35, 0x6d, 0xff}, // mulberry
	{0xb8, 0x8a, 0x12, 0xff}, // mustard
	{0x3b, 0x45, 0x9a, 0xff}, // indigo
	{0x9c, 0x2f, 0x2f, 0xff}, // brick
	{0x2a, 0x86, 0x7a, 0xff}, // jade
}

var (
	ink      = color.NRGBA{0x2b, 0x2b, 0x2b, 0xff} // axes, text
	paper    = color.NRGBA{0xfc, 0xfb, 0xf7, 0xff} // the data area
	rule     = color.NRGBA{0xde, 0xd9, 0xcd, 0xff} // grid at labelled ticks
	theoryCl = color.NRGBA{0x55, 0x55, 0x55, 0xff} // theory when there is one curve
)

func colour(i int) color.Color { return palette[i%len(palette)] }

// faded is c with alpha a (0..1), for interval bars drawn under the markers.
func faded(c color.Color, a float64) color.Color {
	r, g, b, _ := c.RGBA()
	return color.NRGBA{uint8(r >> 8), uint8(g >> 8), uint8(b >> 8), uint8(math.Round(255 * a))}
}

// Dash patterns: theory curves take them in turn, so several theory curves stay apart.
var theoryDashes = [][]vg.Length{
	{vg.Points(5), vg.Points(3)},
	{vg.Points(1.5), vg.Points(2)},
	{vg.Points(7), vg.Points(2), vg.Points(1.5), vg.Points(2)},
}

var preDashes = []vg.Length{vg.Points(1), vg.Points(2)}

func sans(size vg.Length) font.Font {
	return font.From(font.Font{Typeface: "Liberation", Variant: "Sans"}, size)
}

func sansBold(size vg.Length) font.Font {
	return font.From(font.Font{Typeface: "Liberation", Variant: "Sans", Weight: xfont.WeightBold}, size)
}

// downTriangle is the marker of a point with no errors: its upper bound, pointing down to say
// the rate lies below.
type downTriangle struct{}

func (downTriangle) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	r := sty.Radius * 1.15
	p := make(vg.Path, 0, 4)
	p.Move(vg.Point{X: pt.X - r, Y: pt.Y + r*0.6})
	p.Line(vg.Point{X: pt.X + r, Y: pt.Y + r*0.6})
	p.Line(vg.Point{X: pt.X, Y: pt.Y - r*1.1})
	p.Close()
	c.SetLineStyle(draw.LineStyle{Color: sty.Color, Width: vg.Points(0.9)})
	c.Stroke(p)
}

// diamond is the frame error rate's marker.
type diamond struct{}

func (diamond) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	r := sty.Radius * 1.2
	p := make(vg.Path, 0, 5)
	p.Move(vg.Point{X: pt.X, Y: pt.Y + r})
	p.Line(vg.Point{X: pt.X + r, Y: pt.Y})
	p.Line(vg.Point{X: pt.X, Y: pt.Y - r})
	p.Line(vg.Point{X: pt.X - r, Y: pt.Y})
	p.Close()
	c.Fill(p)
}

// ring is a hollow circle with a visible stroke (the pre-decoder BER's marker).
type ring struct{}

func (ring) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	p := make(vg.Path, 0, 3)
	p.Move(vg.Point{X: pt.X + sty.Radius, Y: pt.Y})
	p.Arc(pt, sty.Radius, 0, 2*math.Pi)
	p.Close()
	c.SetLineStyle(draw.LineStyle{Color: sty.Color, Width: vg.Points(1)})
	c.Stroke(p)
}
