package sim

// Axis is a swept parameter with numbers for values, made by Experiment.Axis. A script reads
// it at a point with At, so the parameter's name is typed once, where it is swept:
//
//	ebn0 := x.Axis("ebn0_db", sim.Range(0, 10, 1)...)
//	… channel.AWGN(ebn0.At(p)) …
//
// The first Axis of an experiment is the x axis of the plots, wherever the curves are declared.
type Axis struct {
	name string
}

// Axis sweeps a parameter over values and returns it to be read at each point. The first Axis
// is the x axis; each further one multiplies the grid (one curve per value in the plot). name
// heads the parameter's column in table.csv. It is Sweep returning the parameter instead of
// the experiment.
func (x *Experiment) Axis(name string, values ...float64) *Axis {
	x.sweep("sim.Axis", name, values)
	// The x axis comes first, even when choices or curves were declared before it.
	n := len(x.spec.Params) - 1
	numeric := false
	for _, p := range x.spec.Params[:n] {
		numeric = numeric || p.Labels == nil
	}
	if !numeric && n > 0 {
		p := x.spec.Params[n]
		copy(x.spec.Params[1:], x.spec.Params[:n])
		x.spec.Params[0] = p
		if x.typed.curves != nil {
			x.typed.curveAt++
		}
	}
	return &Axis{name: name}
}

// At is the axis's value at the point p.
func (a *Axis) At(p Point) float64 { return p.Get(a.name) }

// Int is At rounded to an int, for counts such as converter bits or a modulation order.
func (a *Axis) Int(p Point) int { return p.Int(a.name) }

// Name is the parameter's name, the heading of its column.
func (a *Axis) Name() string { return a.name }

// Choice is a parameter swept over named choices (modems, codes, paths), made by
// Experiment.Choices; At reads the choice of a point. For choices that are each a link with a
// theory of its own, declare them as curves (Experiment.Curve) instead.
type Choice struct {
	name   string
	labels []string
}

// Choices sweeps a parameter over named choices and returns it to be read at each point. It is
// SweepLabels returning the parameter instead of the experiment.
func (x *Experiment) Choices(name string, labels ...string) *Choice {
	x.sweepLabels("sim.Choices", name, labels, false)
	return &Choice{name: name, labels: append([]string(nil), labels...)}
}

// At is the name of the point's choice ("QPSK").
func (c *Choice) At(p Point) string { return p.Label(c.name) }

// Index is the position of the point's choice among the choices, from 0.
func (c *Choice) Index(p Point) int { return p.Int(c.name) }

// Name is the parameter's name, the heading of its column.
func (c *Choice) Name() string { return c.name }
