package plots

import (
	"cmp"
	"fmt"
	"image/color"
	"math"
	"slices"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"tally/blocks/link"
	"tally/runtime/result"
)

// specCl is the colour of target and spec lines: a dark red no curve uses, so a line the
// engineer set reads apart from the lines the run measured.
var specCl = color.NRGBA{0x9e, 0x1b, 0x32, 0xff}

// levelDashes is the pattern of target and spec lines (long dash, gap, dot, gap), unlike any
// theory or tap line.
var levelDashes = []vg.Length{vg.Points(9), vg.Points(2.5), vg.Points(1.5), vg.Points(2.5)}

// level is one horizontal line in a panel: a target (x.Target, x.TargetOn) with the crossing
// of each curve, or a spec a stop rule claims against (stop.Below, stop.Above).
type level struct {
	rate  float64
	label string // at the line's left end: "target 1e-05", "below 1e-06"
	cross []crossing
}

// crossing is where one curve meets a target: x, its interval (an open end is ±Inf) and the
// words at the mark.
type crossing struct {
	x, low, high float64
	text         string
	cl           color.Color
	below        bool // label under the mark (every other curve, so neighbours do not collide)
}

// levels are a panel's targets and specs.
type levels []level

// levelLines are the targets and specs on the left panel's taps (fer false) or on the frame
// error rate (fer true), with each curve's crossing; nil when there are none.
func levelLines(r *result.Run, cs []curve, taps []string, fer bool) levels {
	on := func(tap string) bool {
		if fer {
			return tap == link.TapFER
		}
		for _, t := range taps {
			if t == tap {
				return true
			}
		}
		return false
	}
	var ls levels
	find := func(rate float64, label string) *level {
		for i := range ls {
			if ls[i].rate == rate && ls[i].label == label {
				return &ls[i]
			}
		}
		ls = append(ls, level{rate: rate, label: label})
		return &ls[len(ls)-1]
	}
	for _, t := range r.Targets {
		if !on(t.Tap) || !(t.Rate > 0) {
			continue
		}
		label := words("target", tapWord(t.Tap, taps), rateText(t.Rate))
		l := find(t.Rate, label)
		if !t.Found {
			continue
		}
		ci := 0
		for i, c := range cs {
			if c.key == t.Curve {
				ci = i
			}
		}
		cl := color.Color(ink)
		if len(cs) > 1 {
			cl = colour(ci)
		}
		l.cross = append(l.cross, crossing{x: t.X, low: t.Low, high: t.High, text: crossText(t.X, t.Unit), cl: cl})
	}
	for _, s := range r.Specs {
		if on(s.Tap) && s.Rate > 0 {
			find(s.Rate, words("spec:", tapWord(s.Tap, taps), s.Rule, rateText(s.Rate)))
		}
	}
	if len(ls) == 0 {
		return nil
	}
	// Neighbours along the axis put their labels on opposite sides of the line.
	for _, l := range ls {
		slices.SortStableFunc(l.cross, func(a, b crossing) int { return cmp.Compare(a.x, b.x) })
		for i := range l.cross {
			l.cross[i].below = i%2 == 1
		}
	}
	return ls
}

// tapWord names a level's tap in its label only when the panel shows several taps.
func tapWord(tap string, taps []string) string {
	if len(taps) < 2 || tap == link.TapFER {
		return ""
	}
	return tap
}

// words joins the non-empty parts with spaces.
func words(parts ...string) string {
	var w []string
	for _, p := range parts {
		if p != "" {
			w = append(w, p)
		}
	}
	return strings.Join(w, " ")
}

// rateText writes a rate as the script would type it: 1e-05 → "1e-5".
func rateText(v float64) string {
	s := fmt.Sprintf("%g", v)
	s = strings.Replace(s, "e-0", "e-", 1)
	return strings.Replace(s, "e+0", "e+", 1)
}

// crossText is a crossing's position in the axis's unit: two decimals in dB, else three
// significant digits.
func crossText(x float64, unit string) string {
	v := result.AxisValue(x, unit)
	switch unit {
	case "":
		return v
	case "°":
		return v + "°"
	}
	return v + " " + unit
}

// rates are the levels' rates, so the y range holds every line.
func (ls levels) rates() []float64 {
	var v []float64
	for _, l := range ls {
		v = append(v, l.rate)
	}
	return v
}

// legend is the legend's entry for the lines.
func (ls levels) legend() string {
	for _, l := range ls {
		if len(l.cross) > 0 {
			return "target, crossing"
		}
	}
	if strings.HasPrefix(ls[0].label, "spec") {
		return "spec"
	}
	return "target"
}

// Thumbnail is the legend's sample: the line with a crossing mark on it.
func (ls levels) Thumbnail(c *draw.Canvas) {
	y := c.Center().Y
	c.StrokeLine2(draw.LineStyle{Color: specCl, Width: vg.Points(1), Dashes: levelDashes}, c.Min.X, y, c.Max.X, y)
	for _, l := range ls {
		if len(l.cross) > 0 {
			c.DrawGlyphNoClip(crossSty(ink), c.Center())
			return
		}
	}
}

func crossSty(cl color.Color) draw.GlyphStyle {
	return draw.GlyphStyle{Color: cl, Radius: vg.Points(4.2), Shape: draw.RingGlyph{}}
}

// Plot draws each line across the panel with its label at the left end, and on it each
// crossing: a ring at the crossing, a bar over its interval (to the panel's edge where the
// sweep leaves it open) and the crossing's value beside the ring.
func (ls levels) Plot(c draw.Canvas, p *plot.Plot) {
	tx, ty := p.Transforms(&c)
	line := draw.LineStyle{Color: specCl, Width: vg.Points(1), Dashes: levelDashes}
	words := textStyle(sans(7.5), specCl)
	for _, l := range ls {
		y := ty(l.rate)
		if y < c.Min.Y || y > c.Max.Y {
			continue
		}
		c.StrokeLine2(line, c.Min.X, y, c.Max.X, y)
		c.FillText(words, vg.Point{X: c.Min.X + 4, Y: y + 2}, l.label)
		for _, k := range l.cross {
			x := tx(k.x)
			if x < c.Min.X || x > c.Max.X {
				continue
			}
			lo, hi := c.Min.X, c.Max.X
			if !math.IsInf(k.low, 0) && !math.IsNaN(k.low) {
				lo = max(lo, tx(k.low))
			}
			if !math.IsInf(k.high, 0) && !math.IsNaN(k.high) {
				hi = min(hi, tx(k.high))
			}
			bar := draw.LineStyle{Color: faded(k.cl, 0.7), Width: vg.Points(2.4)}
			c.StrokeLine2(bar, lo, y, hi, y)
			c.DrawGlyph(crossSty(k.cl), vg.Point{X: x, Y: y})
			// Above right of the mark, where a falling curve has already passed below the
			// line; every other curve's below left, where it has not yet come down.
			st := textStyle(sansBold(7.5), k.cl)
			at := vg.Point{X: x + vg.Points(5), Y: y + vg.Points(4)}
			if k.below {
				st.XAlign, st.YAlign = draw.XRight, draw.YTop
				at = vg.Point{X: x - vg.Points(5), Y: y - vg.Points(4)}
			}
			c.FillText(st, at, k.text)
		}
	}
}
