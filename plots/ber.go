package plots

import (
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

// curve is the points of one value of the parameters after the first, in sweep order.
type curve struct {
	label  string
	key    string // as a target names its curve: "modem=QPSK code=1/2"
	points []result.Point
}

// curves groups the run's points by the values of every parameter but the first.
func curves(r *result.Run) []curve {
	var cs []curve
	index := map[string]int{}
	for _, p := range r.Points {
		var parts, names []string
		for i := 1; i < len(r.Params) && i < len(p.Values); i++ {
			parts = append(parts, ValueLabel(r.Params[i], r.Value(p, i)))
			names = append(names, r.Params[i]+"="+r.Value(p, i))
		}
		key := strings.Join(parts, ", ")
		k, ok := index[key]
		if !ok {
			k = len(cs)
			index[key] = k
			cs = append(cs, curve{label: key, key: strings.Join(names, " ")})
		}
		cs[k].points = append(cs[k].points, p)
	}
	return cs
}

// showFrames reports whether the frame error rate gets its own panel: for a coded link (it has
// a pre-decoder tap), or when the run was judged on frames (a rule or a target on the fer tap).
func showFrames(r *result.Run) bool {
	if r.TapIndex(link.TapFER) < 0 {
		return false
	}
	if r.TapIndex(link.TapPre) >= 0 {
		return true
	}
	for _, t := range r.Targets {
		if t.Tap == link.TapFER {
			return true
		}
	}
	for _, p := range r.Points {
		if strings.HasPrefix(p.Stop, link.TapFER+"_") {
			return true
		}
	}
	return false
}

// BER draws a run's error rates against its first swept parameter: the taps the run shows
// (result.Run.ShownTaps: the one its stop rules and targets judge, or the script's choice) in
// the left panel, the frame error rate in a panel of its own, the targets as lines with each
// curve's crossing marked. It returns nil when no point counted anything (nothing to draw).
func BER(r *result.Run) (*Figure, error) {
	if len(r.Params) == 0 {
		return nil, nil
	}
	taps := leftTaps(r)
	main := r.TapIndex(taps[0])
	if main < 0 {
		return nil, nil
	}
	counted := false
	for _, p := range r.Points {
		for _, name := range taps {
			if k := r.TapIndex(name); k >= 0 && k < len(p.Taps) && p.Taps[k].Trials > 0 {
				counted = true
			}
		}
	}
	if !counted {
		return nil, nil
	}
	cs := curves(r)
	many := len(cs) > 1
	frames := showFrames(r)
	legend := &Legend{}
	confidence := fmt.Sprintf("%g %%", 100*r.Confidence)

	left := panel(r, leftLabel(taps))
	var right *plot.Plot
	if frames {
		right = panel(r, "frame error rate")
	}
	var ys, fys []float64 // values that set the y ranges
	boundSty := func(cl color.Color) draw.GlyphStyle {
		return draw.GlyphStyle{Color: cl, Radius: vg.Points(3), Shape: downTriangle{}}
	}
	for ci, c := range cs {
		cl := colour(ci)
		for k, name := range taps {
			ti := r.TapIndex(name)
			st := styleOf(k, name)
			s := tapSeries(c.points, ti)
			s.line = draw.LineStyle{Color: cl, Width: st.width, Dashes: st.dashes}
			s.glyph = draw.GlyphStyle{Color: cl, Radius: st.radius, Shape: st.glyph}
			s.boundSty = boundSty(cl)
			left.Add(s)
			ys = append(ys, s.extent()...)
			if m := estimatorMarks(c.points, ti, cl); m != nil {
				left.Add(m)
			}
			switch {
			case k == 0 && many:
				legend.Add(c.label, s)
			case !many:
				legend.Add(tapLegend(name), s)
			}
		}
		if frames {
			fer := r.TapIndex(link.TapFER)
			sf := tapSeries(c.points, fer)
			sf.line = draw.LineStyle{Color: cl, Width: vg.Points(1.4)}
			sf.glyph = draw.GlyphStyle{Color: cl, Radius: vg.Points(2.6), Shape: diamond{}}
			sf.boundSty = boundSty(cl)
			right.Add(sf)
			fys = append(fys, sf.extent()...)
			if !many {
				legend.Add(tapLegend(link.TapFER), sf)
			}
		}
	}
	// Theory curves are drawn after the measured ones so they stay visible through the bars, but
	// they do not stretch the axis: at most two decades below the lowest measured figure.
	var theoryY, theoryFY []float64
	for k, name := range r.Theory {
		panel, ty := left, &theoryY
		if frames && limitOn(r, name) == link.TapFER {
			panel, ty = right, &theoryFY // a limit on the frame error rate goes beside the FER
		}
		var key lineKey // the theory's key: its dashes in the colour of each curve it is drawn for
		for ci, c := range cs {
			cl := theoryColour(ci, many)
			s := &series{}
			for _, p := range c.points {
				s.x = append(s.x, p.Values[0])
				v := math.NaN()
				if k < len(p.Theory) && p.Theory[k] > 0 {
					v = p.Theory[k]
				}
				s.y = append(s.y, v)
				*ty = append(*ty, v)
			}
			s.line = draw.LineStyle{Color: cl, Width: vg.Points(1), Dashes: theoryDashes[k%len(theoryDashes)]}
			panel.Add(s)
			key.styles = append(key.styles, s.line)
		}
		label := "theory: " + name
		if name == "theory" {
			label = "theory" // the typed surface's unnamed theory column
		}
		legend.Add(label, key)
	}
	if many {
		// With a colour per curve, the taps after the first are told apart by their marks.
		for k, name := range taps[1:] {
			st := styleOf(k+1, name)
			legend.Add(tapLegend(name), &series{line: draw.LineStyle{Color: theoryCl, Width: st.width, Dashes: st.dashes},
				glyph: draw.GlyphStyle{Color: theoryCl, Radius: st.radius, Shape: st.glyph}})
		}
	}
	// Targets and specs: a line at the rate, each curve's crossing marked (targets.go).
	var keyed levels // the lines the legend names (those of the left panel, else the FER's)
	if lines := levelLines(r, cs, taps, false); lines != nil {
		left.Add(lines)
		ys = append(ys, lines.rates()...)
		keyed = lines
	}
	if frames {
		if lines := levelLines(r, cs, taps, true); lines != nil {
			right.Add(lines)
			fys = append(fys, lines.rates()...)
			if keyed == nil || keyed.legend() != "target, crossing" && lines.legend() == "target, crossing" {
				keyed = lines
			}
		}
	}
	if keyed != nil {
		legend.Add(keyed.legend(), keyed)
	}
	addEstimatorKeys(legend, r, main)
	drawn := slices.Clone(taps)
	if frames {
		drawn = append(drawn, link.TapFER)
	}
	if hasBound(r, drawn) {
		legend.Add("no errors: "+confidence+" upper bound", boundKey{boundSty(theoryCl)})
	}
	setY(left, ys, theoryY)
	panels := []*plot.Plot{left}
	if frames {
		setY(right, fys, theoryFY)
		panels = append(panels, right)
	}
	paired := pairedPanel(r, cs, legend)
	if paired != nil {
		panels = append(panels, paired)
	}
	for _, p := range panels {
		setX(r, p)
	}
	w := 7.2 * vg.Inch
	if frames {
		w = 11 * vg.Inch
	}
	if paired != nil {
		w += 3.8 * vg.Inch
	}
	return &Figure{
		Title:   r.Name,
		Caption: caption(r, main),
		Panels:  panels,
		Legend:  legend,
		Width:   w,
		Height:  4.6 * vg.Inch,
	}, nil
}

// limitOn is the tap a theory curve is a limit on ("" when it is an ordinary theory curve).
func limitOn(r *result.Run, curve string) string {
	for _, l := range r.Limits {
		if l.Curve == curve {
			return l.Tap
		}
	}
	return ""
}

// theoryColour is neutral for a single curve, else the curve's own colour.
func theoryColour(ci int, many bool) color.Color {
	if many {
		return colour(ci)
	}
	return theoryCl
}

// hasBound reports whether a point of one of the drawn taps counted no errors (it is drawn
// at its upper bound).
func hasBound(r *result.Run, taps []string) bool {
	for _, p := range r.Points {
		for _, t := range p.Taps {
			if t.Trials > 0 && t.Errors == 0 && !t.Weighted() && slices.Contains(taps, t.Name) {
				return true
			}
		}
	}
	return false
}

// tapSeries is the estimate and interval of tap t along a curve; a point with no errors gives
// its upper bound instead.
func tapSeries(pts []result.Point, t int) *series {
	s := &series{}
	for _, p := range pts {
		s.x = append(s.x, p.Values[0])
		y, lo, hi, b := math.NaN(), math.NaN(), math.NaN(), math.NaN()
		if t < len(p.Taps) && p.Taps[t].Trials > 0 {
			tp := p.Taps[t]
			if tp.Errors > 0 || tp.Weighted() && tp.Rate > 0 {
				y, lo, hi = tp.Rate, tp.Low, tp.High
			} else {
				b = tp.High
			}
		}
		s.y = append(s.y, y)
		s.low = append(s.low, lo)
		s.high = append(s.high, hi)
		s.bound = append(s.bound, b)
	}
	return s
}

// extent are the y values the series needs to show.
func (s *series) extent() []float64 {
	var v []float64
	for i := range s.x {
		for _, y := range []float64{s.y[i], s.low[i], s.high[i], s.bound[i]} {
			if y > 0 {
				v = append(v, y)
			}
		}
	}
	return v
}

// setY sets a log axis over whole decades that holds every measured figure, and the theory
// down to two decades below them.
func setY(p *plot.Plot, measured, theory []float64) {
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, v := range measured {
		lo, hi = math.Min(lo, v), math.Max(hi, v)
	}
	if math.IsInf(lo, 1) {
		lo, hi = 1e-6, 1
	}
	floor := lo / 100
	for _, v := range theory {
		if v > 0 {
			lo, hi = math.Min(lo, math.Max(v, floor)), math.Max(hi, v)
		}
	}
	p.Y.Min, p.Y.Max = decadeRange(lo, math.Min(hi, 1))
	p.Y.Scale = plot.LogScale{}
	p.Y.Tick.Marker = decadeTicks{}
	p.Y.Label.Padding = decadeLabels{}.width(p.Y.Min, p.Y.Max) + vg.Points(3)
	p.Add(decadeLabels{})
}

// setX spans the swept values with a little room, or the labels of a labelled parameter.
func setX(r *result.Run, p *plot.Plot) {
	p.X.Label.Text = AxisLabel(r.Params[0])
	if len(r.Labels) > 0 && r.Labels[0] != nil {
		p.X.Min, p.X.Max = -0.5, float64(len(r.Labels[0]))-0.5
		p.X.Tick.Marker = labelTicks(r.Labels[0])
		return
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	var xs []float64
	for _, pt := range r.Points {
		lo, hi = math.Min(lo, pt.Values[0]), math.Max(hi, pt.Values[0])
		xs = append(xs, pt.Values[0])
	}
	if t := sweepTicks(xs); t != nil {
		p.X.Tick.Marker = t
	}
	room := 0.04 * (hi - lo)
	if room == 0 {
		room = 0.5
	}
	p.X.Min, p.X.Max = lo-room, hi+room
}

// panel is an empty panel in tally's look, y labelled label.
func panel(_ *result.Run, label string) *plot.Plot {
	p := plot.New()
	p.BackgroundColor = nil
	for _, a := range []*plot.Axis{&p.X, &p.Y} {
		a.Label.TextStyle.Font = sans(10)
		a.Label.TextStyle.Color = ink
		a.Tick.Label.Font = sans(8.5)
		a.Tick.Label.Color = ink
		a.LineStyle = draw.LineStyle{Color: ink, Width: vg.Points(0.6)}
		a.Tick.LineStyle = draw.LineStyle{Color: ink, Width: vg.Points(0.5)}
		a.Tick.Length = vg.Points(4)
		a.Padding = 0
	}
	p.Y.Label.Text = label
	p.Add(area{}, grid{})
	return p
}

// grid is hairlines at the labelled ticks, drawn over the paper and under the data.
type grid struct{}

func (grid) Plot(c draw.Canvas, p *plot.Plot) {
	tx, ty := p.Transforms(&c)
	st := draw.LineStyle{Color: rule, Width: vg.Points(0.5)}
	for _, t := range p.X.Tick.Marker.Ticks(p.X.Min, p.X.Max) {
		if !t.IsMinor() {
			if x := tx(t.Value); x > c.Min.X && x < c.Max.X {
				c.StrokeLine2(st, x, c.Min.Y, x, c.Max.Y)
			}
		}
	}
	for _, t := range p.Y.Tick.Marker.Ticks(p.Y.Min, p.Y.Max) {
		if !t.IsMinor() {
			if y := ty(t.Value); y > c.Min.Y && y < c.Max.Y {
				c.StrokeLine2(st, c.Min.X, y, c.Max.X, y)
			}
		}
	}
}

// caption says how the figures were made: script, seed, the interval methods the main tap used
// (a point ended by an error count gets one valid for that rule), level and points.
func caption(r *result.Run, ber int) string {
	var methods []string
	seen := map[string]bool{}
	widened := false
	for _, p := range r.Points {
		if ber >= 0 && ber < len(p.Taps) {
			m, clustered := strings.CutSuffix(p.Taps[ber].Method, "+clustered")
			widened = widened || clustered
			if m != "" && !seen[m] {
				seen[m] = true
				methods = append(methods, m)
			}
		}
	}
	if len(methods) == 0 {
		methods = append(methods, r.Method)
	}
	bursts := ""
	if widened {
		bursts = ", widened where errors came in bursts"
	}
	var parts []string
	if r.Script != "" {
		parts = append(parts, r.Script)
	}
	parts = append(parts, fmt.Sprintf("seed %d", r.Seed),
		fmt.Sprintf("%s intervals at %g %%%s", strings.Join(methods, " / "), 100*r.Confidence, bursts),
		fmt.Sprintf("%d points", len(r.Points)))
	if r.Interrupted {
		parts = append(parts, "interrupted: last point incomplete")
	}
	return strings.Join(parts, " · ")
}
