package plots

import (
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// lineKey is a legend key of one line drawn in several colours, a segment each: the key of a
// theory curve drawn once per curve in that curve's colour, so the key shows the colours the
// plot uses.
type lineKey struct{ styles []draw.LineStyle }

func (k lineKey) Thumbnail(c *draw.Canvas) {
	if len(k.styles) == 0 {
		return
	}
	y := c.Center().Y
	min, max := c.Min.X, c.Max.X
	step := (max - min) / vg.Length(len(k.styles))
	for i, s := range k.styles {
		x0 := min + vg.Length(i)*step
		c.StrokeLine2(s, x0, y, x0+step, y)
	}
}
