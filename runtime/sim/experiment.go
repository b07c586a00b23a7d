// Package sim is what an experiment script types: a sweep, the link for a point, the stop
// rules, theory curves to compare with, and Run.
//
//	x := sim.New("sensor uplink")
//	x.Sweep("ebn0_db", sim.Range(0, 10, 2)...)
//	x.Link(func(p sim.Point) *link.Link {
//		m := modem.QPSK()
//		return link.Chain(source.Random(4096), m.Mod(), channel.AWGN(p.Get("ebn0_db")), m.Demod())
//	})
//	x.Stop(stop.Errors(100), stop.Bits(1e7))
//	x.Theory("qpsk", func(p sim.Point) float64 { return theory.QPSK(p.Get("ebn0_db")) })
//	x.Run()
//
// The same file runs compiled (go run file.go) and interpreted (tally run file.go) with the
// same table.
package sim

import (
	"fmt"
	"math"

	"tally/blocks/link"
	"tally/blocks/stop"
	"tally/runtime/result"
)

// Experiment is one experiment: its sweep, link, rules and curves.
type Experiment struct {
	name       string
	params     []param
	build      func(p Point) *link.Link
	rules      []stop.Rule
	sweepRules []stop.SweepRule
	scatterAt  []float64
	theory     []curve
	limits     []limit
	inputs     []result.Input // files read by ReadFile
	targets    []target
	confidence float64
	method     string
	seed       uint64
	opts       *Options
}

type param struct {
	name   string
	values []float64
	labels []string
}

type curve struct {
	name string
	fn   func(p Point) float64
}

type target struct {
	tap     string
	rate    float64
	against string
}

// New starts an experiment; name titles its outputs.
func New(name string) *Experiment { return NewWith(name, commandLine()) }

// Sweep adds a swept parameter with its values. The first Sweep is the x axis; each further one
// multiplies the grid (one curve per value in the plot).
func (x *Experiment) Sweep(name string, values ...float64) *Experiment {
	x.checkName(name)
	if len(values) == 0 {
		fail(fmt.Errorf("sim.Sweep: parameter %q has no values", name))
	}
	for _, v := range values {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			fail(fmt.Errorf("sim.Sweep: parameter %q has value %v, not a finite number", name, v))
		}
	}
	x.params = append(x.params, param{name: name, values: append([]float64(nil), values...)})
	return x
}

// SweepLabels sweeps a parameter over named choices (modems, codes): Point.Get gives the
// choice's index 0, 1, …, Point.Label its name, and the table shows the name.
func (x *Experiment) SweepLabels(name string, labels ...string) *Experiment {
	x.checkName(name)
	if len(labels) == 0 {
		fail(fmt.Errorf("sim.SweepLabels: parameter %q has no labels", name))
	}
	v := make([]float64, len(labels))
	for i := range v {
		v[i] = float64(i)
	}
	x.params = append(x.params, param{name: name, values: v, labels: append([]string(nil), labels...)})
	return x
}

func (x *Experiment) checkName(name string) {
	if !isColumnName(name) {
		fail(fmt.Errorf("sim.Sweep: parameter name %q must be letters, digits and _ (it names a table column)", name))
	}
	for _, p := range x.params {
		if p.name == name {
			fail(fmt.Errorf("sim.Sweep: parameter %q is swept twice", name))
		}
	}
}

// Link sets the function that builds the link for a point. It is called once per worker and
// point, since blocks keep buffers; it must build the same link every time for the same point.
func (x *Experiment) Link(build func(p Point) *link.Link) *Experiment {
	x.build = build
	return x
}

// Stop sets the rules that end each point; a point ends when any is met. Without Stop a point
// ends at 100 errors or 1e9 bits.
func (x *Experiment) Stop(rules ...stop.Rule) *Experiment {
	for _, r := range rules {
		if r == nil {
			fail(fmt.Errorf("sim.Stop: a rule is nil"))
		}
		if c, ok := r.(link.Checked); ok {
			if err := c.Err(); err != nil {
				fail(err)
			}
		}
	}
	x.rules = append(x.rules, rules...)
	return x
}

// Theory adds a curve to compare with: a column in the table, a dashed line in the plot.
func (x *Experiment) Theory(name string, fn func(p Point) float64) *Experiment {
	if !isColumnName(name) {
		fail(fmt.Errorf("sim.Theory: curve name %q must be letters, digits and _ (it names a table column)", name))
	}
	x.theory = append(x.theory, curve{name: name, fn: fn})
	return x
}

// Target asks for the x value (Eb/N0, say) at which the BER crosses rate, and, when a theory
// curve is named, the penalty in dB against it.
func (x *Experiment) Target(rate float64, against ...string) *Experiment {
	return x.TargetOn(link.TapBER, rate, against...)
}

// TargetOn is Target on another tap ("fer", "pre", or a tap of the script's own).
func (x *Experiment) TargetOn(tap string, rate float64, against ...string) *Experiment {
	if !(rate > 0 && rate < 1) {
		fail(fmt.Errorf("sim.Target: rate %v must lie between 0 and 1", rate))
	}
	t := target{tap: tap, rate: rate}
	if len(against) > 0 {
		t.against = against[0]
	}
	x.targets = append(x.targets, t)
	return x
}

// Confidence sets the confidence level of the intervals (default 0.95).
func (x *Experiment) Confidence(level float64) *Experiment {
	if !(level > 0 && level < 1) {
		fail(fmt.Errorf("sim.Confidence: level %v must lie strictly between 0 and 1", level))
	}
	x.confidence = level
	return x
}

// Interval sets the interval method: "clopper-pearson" (default), "wilson" or "jeffreys".
func (x *Experiment) Interval(method string) *Experiment {
	x.method = method
	return x
}

// Seed sets the experiment's seed (a -seed flag on the command line overrides it).
func (x *Experiment) Seed(seed uint64) *Experiment {
	x.seed = seed
	return x
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
