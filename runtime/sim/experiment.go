// Package sim is what an experiment script types: the axes, the curves with their links and
// theories, the stop rules, the targets, and Run.
//
//	x := sim.New("sensor uplink")
//	ebn0 := x.Axis("ebn0_db", sim.Range(0, 10, 2)...)
//	x.Curve("QPSK", func(p sim.Point) *link.Link {
//		m := modem.QPSK()
//		return link.Chain(source.Random(4096), m.Mod(), channel.AWGN(ebn0.At(p)), m.Demod())
//	}).Theory(theory.QPSK)
//	x.Stop(stop.Errors(100), stop.Bits(1e7))
//	x.Target(1e-5)
//	x.Run()
//
// The older form, which names parameters and theories by strings (Sweep, SweepLabels, Link,
// Point.Get, Theory, Target against a name, Scatter by values), still runs unchanged:
//
//	x.Sweep("ebn0_db", sim.Range(0, 10, 2)...)
//	x.Link(func(p sim.Point) *link.Link { … channel.AWGN(p.Get("ebn0_db")) … })
//	x.Theory("qpsk", func(p sim.Point) float64 { return theory.QPSK(p.Get("ebn0_db")) })
//	x.Target(1e-5, "qpsk")
//
// The same file runs compiled (go run file.go) and interpreted (tally run file.go) with the
// same table.
package sim

import (
	"fmt"
	"math"

	"tally/blocks/link"
	"tally/blocks/stop"
	"tally/runtime/internal/runner"
)

// Experiment is one experiment: its sweep, link, rules and curves. It holds declarations
// only; how it runs (workers, seed override, checkpoints) and where its outputs go come from
// the command line or the host, never from the script.
type Experiment struct {
	spec  runner.Spec
	opts  *runner.Options
	typed typed // curves and what goes with them (curve.go)
}

// DefaultSeed is the seed of a run that names none; it is recorded in every run record.
const DefaultSeed = runner.DefaultSeed

// New starts an experiment; name titles its outputs.
func New(name string) *Experiment { return newExperiment(name, runner.CommandLine()) }

func newExperiment(name string, o *runner.Options) *Experiment {
	return &Experiment{spec: runner.NewSpec(name), opts: o}
}

func init() {
	runner.NewExperiment = func(name string, o *runner.Options) any { return newExperiment(name, o) }
}

// Sweep adds a swept parameter with its values. The first Sweep is the x axis; each further one
// multiplies the grid (one curve per value in the plot).
func (x *Experiment) Sweep(name string, values ...float64) *Experiment {
	x.sweep("sim.Sweep", name, values)
	return x
}

// sweep is Sweep in the name of the call who made it (Sweep, Axis), for its messages.
func (x *Experiment) sweep(who, name string, values []float64) {
	x.checkName(who, name)
	if len(values) == 0 {
		runner.Fail(fmt.Errorf("%s: parameter %q has no values", who, name))
	}
	for _, v := range values {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			runner.Fail(fmt.Errorf("%s: parameter %q has value %v, not a finite number", who, name, v))
		}
	}
	x.spec.Params = append(x.spec.Params, runner.Param{Name: name, Values: append([]float64(nil), values...)})
}

// SweepLabels sweeps a parameter over named choices (modems, codes): Point.Get gives the
// choice's index 0, 1, …, Point.Label its name, and the table shows the name.
func (x *Experiment) SweepLabels(name string, labels ...string) *Experiment {
	x.sweepLabels("sim.SweepLabels", name, labels, false)
	return x
}

// sweepLabels is SweepLabels in the name of the call who made it (SweepLabels, Choices,
// Variants); paired marks the variants of a paired comparison.
func (x *Experiment) sweepLabels(who, name string, labels []string, paired bool) {
	x.checkName(who, name)
	if len(labels) == 0 {
		runner.Fail(fmt.Errorf("%s: parameter %q has no labels", who, name))
	}
	v := make([]float64, len(labels))
	for i := range v {
		v[i] = float64(i)
	}
	x.spec.Params = append(x.spec.Params, runner.Param{Name: name, Values: v, Labels: append([]string(nil), labels...), Paired: paired})
}

func (x *Experiment) checkName(who, name string) {
	if !isColumnName(name) {
		runner.Fail(fmt.Errorf("%s: parameter name %q must be letters, digits and _ (it names a table column)", who, name))
	}
	for _, p := range x.spec.Params {
		if p.Name == name {
			runner.Fail(fmt.Errorf("%s: parameter %q is swept twice", who, name))
		}
	}
}

// Link sets the function that builds the link for a point. It is called once per worker and
// point (and twice more to check the links), since blocks keep buffers; it must build the same
// link every time for the same point. Declare a custom block's buffers inside it, so each link
// gets its own: a run whose links share a block or its state is refused.
func (x *Experiment) Link(build func(p Point) *link.Link) *Experiment {
	if build == nil {
		x.spec.Build = nil
		return x
	}
	x.spec.Build = func(p runner.Point) *link.Link { return build(pointOf(p)) }
	return x
}

// Stop sets the rules that end each point; a point ends when any is met. Without Stop a point
// ends at 100 errors or 1e9 bits.
func (x *Experiment) Stop(rules ...stop.Rule) *Experiment {
	for _, r := range rules {
		if r == nil {
			runner.Fail(fmt.Errorf("sim.Stop: a rule is nil"))
		}
		if c, ok := r.(link.Checked); ok {
			if err := c.Err(); err != nil {
				runner.Fail(err)
			}
		}
	}
	x.spec.Rules = append(x.spec.Rules, rules...)
	x.spec.NameRules("sim.Stop", x.opts.Here(), rules)
	return x
}

// Theory adds a curve to compare with: a column in the table, a dashed line in the plot.
func (x *Experiment) Theory(name string, fn func(p Point) float64) *Experiment {
	if !isColumnName(name) {
		runner.Fail(fmt.Errorf("sim.Theory: curve name %q must be letters, digits and _ (it names a table column)", name))
	}
	x.spec.Theory = append(x.spec.Theory, runner.Curve{Name: name, Fn: func(p runner.Point) float64 { return fn(pointOf(p)) }})
	return x
}

// Target asks for the x value (Eb/N0, say) at which the BER crosses rate, and, when a theory
// curve is named, the penalty in dB against it. With curves that have their own theory
// (Experiment.Curve), Target(rate) compares each curve with its own.
func (x *Experiment) Target(rate float64, against ...string) *Experiment {
	return x.TargetOn(link.TapBER, rate, against...)
}

// TargetOn is Target on another tap ("fer", "pre", or a tap of the script's own).
func (x *Experiment) TargetOn(tap string, rate float64, against ...string) *Experiment {
	if !(rate > 0 && rate < 1) {
		runner.Fail(fmt.Errorf("sim.Target: rate %v must lie between 0 and 1", rate))
	}
	t := runner.Target{Tap: tap, Rate: rate}
	if tap != link.TapBER {
		x.spec.NameTap("sim.TargetOn", x.opts.Here(), tap)
	}
	if len(against) > 0 {
		t.Against = against[0]
	}
	x.spec.Targets = append(x.spec.Targets, t)
	return x
}

// Confidence sets the confidence level of the intervals (default 0.95).
func (x *Experiment) Confidence(level float64) *Experiment {
	if !(level > 0 && level < 1) {
		runner.Fail(fmt.Errorf("sim.Confidence: level %v must lie strictly between 0 and 1", level))
	}
	x.spec.Confidence = level
	return x
}

// Interval sets the interval method: "clopper-pearson" (default), "wilson" or "jeffreys".
func (x *Experiment) Interval(method string) *Experiment {
	x.spec.Method = method
	return x
}

// Seed sets the experiment's seed (a -seed flag on the command line overrides it).
func (x *Experiment) Seed(seed uint64) *Experiment {
	x.spec.Seed = seed
	return x
}

// StopSweep sets rules that end or thin each curve along the x axis: stop.Floor ends a curve
// after its first point shown below a floor BER, stop.Budget skips points predicted to need
// more bits than a cap; each judges the BER unless its Tap names another. Skipped points stay
// in the table with stop "skipped" and the reason in run.json.
func (x *Experiment) StopSweep(rules ...stop.SweepRule) *Experiment {
	for _, r := range rules {
		if r == nil {
			runner.Fail(fmt.Errorf("sim.StopSweep: a rule is nil"))
		}
		if c, ok := r.(link.Checked); ok {
			if err := c.Err(); err != nil {
				runner.Fail(err)
			}
		}
	}
	x.spec.SweepRules = append(x.spec.SweepRules, rules...)
	at := x.opts.Here()
	for _, r := range rules {
		x.spec.NameTap("sim.StopSweep", at, stop.SweepTap(r))
	}
	return x
}

// Scatter asks for a constellation plot (scatter.svg, scatter.png) of the first frame of the
// point whose parameters have these values, in sweep order (Scatter(12) on an Eb/N0 sweep;
// Scatter(12, 1) on a grid): the samples as the last block of the link left them, over the
// modulator's points.
func (x *Experiment) Scatter(values ...float64) *Experiment {
	if len(values) == 0 {
		runner.Fail(fmt.Errorf("sim.Scatter: name the point by its swept values"))
	}
	x.spec.ScatterAt = append([]float64(nil), values...)
	return x
}

// Run runs every point and writes table.csv, run.json, the plots and README.md into the folder
// named after the script beside it. A mistake stops the script with file:line: message. A
// script runs one experiment: a second Run is refused.
func (x *Experiment) Run() {
	x.settle()
	runner.Run(&x.spec, x.opts)
}

func isColumnName(s string) bool {
	if s == "" {
		return false
	}
	for _, c := range s {
		if !(c == '_' || c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z' || c >= '0' && c <= '9') {
			return false
		}
	}
	return true
}
