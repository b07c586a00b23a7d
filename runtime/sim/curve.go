package sim

import (
	"fmt"
	"math"

	"tally/blocks/link"
	"tally/runtime/internal/runner"
)

// Curve is one curve of the plot declared with its own link and, when it has one, its own
// theory, made by Experiment.Curve:
//
//	x.Curve("BPSK", bpsk).Theory(theory.BPSK)
//	qpsk := x.Curve("QPSK", qpsk).Theory(theory.QPSK)
//	qpsk.Scatter(6)
//
// Curves replace a choice swept by name plus a switch on the name in the link and another in
// the theory: each curve says once what it is. In the table the curves are the values of one
// parameter, "curve" unless Experiment.Legend names it, and their theories one column,
// "theory_theory" unless Experiment.TheoryName names it. A target (Experiment.Target) compares
// each curve with its own theory.
type Curve struct {
	x        *Experiment
	name     string
	index    int
	build    func(p Point) *link.Link
	theory   func(p Point) float64 // nil: the curve has no theory (an empty cell)
	limitTap string                // the tap the theory limits, for Limit
}

// typed is what the typed surface declared, turned into the experiment's spec by settle.
type typed struct {
	curves     []*Curve
	curveAt    int    // parameters swept before the first curve: where the curves' column goes
	legend     string // the curves' parameter name
	theoryName string // the curves' theory column
	theoryAt   int    // theory columns declared before the first curve's theory; -1 none yet
	scatter    *Curve
	scatterAt  []float64
	settled    bool
}

// Curve adds a curve: name labels it in the legend, the table and the summary; build makes its
// link for a point (as Experiment.Link does for every point), reading the axes with At.
// Declare curves or one Link, not both.
func (x *Experiment) Curve(name string, build func(p Point) *link.Link) *Curve {
	if build == nil {
		runner.Fail(fmt.Errorf("sim.Curve: the curve %q has no link function", name))
	}
	for _, c := range x.typed.curves {
		if c.name == name {
			runner.Fail(fmt.Errorf("sim.Curve: the curve %q is declared twice", name))
		}
	}
	if x.spec.Build != nil {
		runner.Fail(fmt.Errorf("sim.Curve: the experiment already has a Link for every point; declare each curve with its link, or one Link, not both"))
	}
	if x.typed.curves == nil {
		x.typed.curveAt = len(x.spec.Params)
		x.typed.theoryAt = -1
	}
	c := &Curve{x: x, name: name, index: len(x.typed.curves), build: build}
	x.typed.curves = append(x.typed.curves, c)
	return c
}

// Theory sets the curve's theory as a function of the x axis's value: a column of the table,
// a dashed line in the curve's colour, and what a target compares the curve with. Any
// func(float64) float64 of the x value will do: theory.BPSK, theory.QPSKRayleigh, a curve
// helper such as theory.QAMCurve(16), or a closure of the script's own.
func (c *Curve) Theory(fn func(x float64) float64) *Curve {
	if fn == nil {
		runner.Fail(fmt.Errorf("sim.Curve(%q).Theory: the function is nil", c.name))
	}
	return c.TheoryAt(func(p Point) float64 { return fn(p.Values[0]) })
}

// TheoryAt sets the curve's theory as a function of the whole point, for a theory that depends
// on another swept parameter too (a Rician K factor, a code length).
func (c *Curve) TheoryAt(fn func(p Point) float64) *Curve {
	if fn == nil {
		runner.Fail(fmt.Errorf("sim.Curve(%q).TheoryAt: the function is nil", c.name))
	}
	if c.x.typed.theoryAt < 0 {
		c.x.typed.theoryAt = len(c.x.spec.Theory)
	}
	c.theory = fn
	return c
}

// Limit sets the curve's theory as a limit no link can beat on tap (link.TapFER, say): the
// curve's theory, and a check that names in the summary any point whose interval lies wholly
// below it (see Experiment.Limit). The curves of one experiment limit the same tap.
func (c *Curve) Limit(tap string, fn func(x float64) float64) *Curve {
	if tap == "" {
		runner.Fail(fmt.Errorf("sim.Curve(%q).Limit: name the tap the limit is on (link.TapFER, say)", c.name))
	}
	if fn == nil {
		runner.Fail(fmt.Errorf("sim.Curve(%q).Limit: the function is nil", c.name))
	}
	c.Theory(fn)
	c.limitTap = tap
	return c
}

// Scatter asks for a constellation plot (scatter.svg, scatter.png) of the first frame of this
// curve at the point whose other swept values are at, in sweep order (qpsk.Scatter(6) on an
// Eb/N0 axis): the samples as the last block of the link left them, over the modulator's
// points.
func (c *Curve) Scatter(at ...float64) *Curve {
	if len(at) == 0 {
		runner.Fail(fmt.Errorf("sim.Curve(%q).Scatter: name the point by its value on the x axis", c.name))
	}
	c.x.typed.scatter, c.x.typed.scatterAt = c, append([]float64(nil), at...)
	return c
}

// Name is the curve's name, as the legend shows it.
func (c *Curve) Name() string { return c.name }

// Legend names the parameter whose values the curves are ("modem", "code"): the heading of
// their column in table.csv and the name the legend and the summary show before each curve's
// name. Without Legend it is "curve".
func (x *Experiment) Legend(name string) *Experiment {
	if !isColumnName(name) {
		runner.Fail(fmt.Errorf("sim.Legend: %q must be letters, digits and _ (it names a table column)", name))
	}
	for _, p := range x.spec.Params {
		if p.Name == name {
			runner.Fail(fmt.Errorf("sim.Legend: %q is already a swept parameter; the curves need a name of their own", name))
		}
	}
	x.typed.legend = name
	return x
}

// TheoryName names the column that holds each curve's own theory (theory_<name> in
// table.csv). Without TheoryName it is "theory".
func (x *Experiment) TheoryName(name string) *Experiment {
	if !isColumnName(name) {
		runner.Fail(fmt.Errorf("sim.TheoryName: %q must be letters, digits and _ (it names a table column)", name))
	}
	x.typed.theoryName = name
	return x
}

// Reference adds a theory curve drawn for every curve alike, as a function of the x axis's
// value (theory.QPSK beside fading curves, say): a column in the table, a dashed line in the
// plot. A target does not compare with it; give each curve its own theory for that.
func (x *Experiment) Reference(name string, fn func(x float64) float64) *Experiment {
	if fn == nil {
		runner.Fail(fmt.Errorf("sim.Reference: the function of %q is nil", name))
	}
	return x.Theory(name, func(p Point) float64 { return fn(p.Values[0]) })
}

// settle turns the typed declarations into the spec Run runs: the curves become one swept
// parameter (its labels the curves' names) placed after the x axis, the link a dispatch on
// it, their theories one column, a target without a named theory compares with it, and a
// curve's scatter point a point of the grid.
func (x *Experiment) settle() {
	t := &x.typed
	if t.settled || t.curves == nil {
		return
	}
	t.settled = true
	if x.spec.Build != nil {
		runner.Fail(fmt.Errorf("sim: the experiment has curves (x.Curve) and a Link for every point; declare each curve with its link, or one Link, not both"))
	}
	legend := t.legend
	if legend == "" {
		legend = "curve"
	}
	for _, p := range x.spec.Params {
		if p.Name == legend {
			runner.Fail(fmt.Errorf("sim.Legend: the curves' parameter %q is also a swept parameter; name the curves with x.Legend", legend))
		}
	}
	curves := t.curves
	labels := make([]string, len(curves))
	values := make([]float64, len(curves))
	for i, c := range curves {
		labels[i], values[i] = c.name, float64(i)
	}
	at := min(max(t.curveAt, 1), len(x.spec.Params))
	x.spec.Params = append(x.spec.Params[:at], append([]runner.Param{{Name: legend, Values: values, Labels: labels}}, x.spec.Params[at:]...)...)
	which := func(p runner.Point) *Curve { return curves[int(p.Get(legend))] }
	x.spec.Build = func(p runner.Point) *link.Link { return which(p).build(pointOf(p)) }

	if t.theoryAt >= 0 {
		name := t.theoryName
		if name == "" {
			name = "theory"
		}
		for _, c := range x.spec.Theory {
			if c.Name == name {
				runner.Fail(fmt.Errorf("sim.TheoryName: the curves' theory column %q is also a theory curve's name; name it with x.TheoryName", name))
			}
		}
		col := runner.Curve{Name: name, Fn: func(p runner.Point) float64 {
			if c := which(p); c.theory != nil {
				return c.theory(pointOf(p))
			}
			return math.NaN()
		}}
		x.spec.Theory = append(x.spec.Theory[:t.theoryAt], append([]runner.Curve{col}, x.spec.Theory[t.theoryAt:]...)...)
		tap, limits, theories := "", 0, 0
		for _, c := range curves {
			switch {
			case c.limitTap != "":
				if tap != "" && tap != c.limitTap {
					runner.Fail(fmt.Errorf("sim.Curve(%q).Limit: the curves limit different taps (%q, %q); one experiment's curves limit one tap", c.name, tap, c.limitTap))
				}
				tap = c.limitTap
				limits++
			case c.theory != nil:
				theories++
			}
		}
		if limits > 0 && theories > 0 {
			runner.Fail(fmt.Errorf("sim.Curve: some curves have a Theory and others a Limit; their values share one column, so give every curve the same kind"))
		}
		if limits > 0 {
			x.spec.Limits = append(x.spec.Limits, runner.Limit{Tap: tap, Curve: name})
		}
		for i := range x.spec.Targets {
			if x.spec.Targets[i].Against == "" {
				x.spec.Targets[i].Against = name
			}
		}
	}
	if t.scatter != nil {
		var v []float64
		rest := t.scatterAt
		placed := false
		for _, p := range x.spec.Params {
			if p.Name == legend {
				v = append(v, float64(t.scatter.index))
				placed = true
				continue
			}
			if len(rest) == 0 {
				if !placed {
					runner.Fail(fmt.Errorf("sim.Curve(%q).Scatter: %v names no value of %s; give one for each parameter swept before the curves", t.scatter.name, t.scatterAt, p.Name))
				}
				break
			}
			v = append(v, rest[0])
			rest = rest[1:]
		}
		if len(rest) > 0 {
			runner.Fail(fmt.Errorf("sim.Curve(%q).Scatter: %v names more values than the sweep has parameters besides the curves", t.scatter.name, t.scatterAt))
		}
		x.spec.ScatterAt = v
	}
}
