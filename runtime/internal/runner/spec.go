package runner

import (
	"tally/blocks/link"
	"tally/blocks/stop"
	"tally/runtime/result"
)

// Spec is an experiment as a script declared it through package sim: what to sweep, the link
// of a point, the rules, the curves and the targets. It says nothing of how or where it runs;
// Run and Execute take that from Options.
type Spec struct {
	Name       string
	Params     []Param
	Build      func(p Point) *link.Link
	Rules      []stop.Rule
	SweepRules []stop.SweepRule
	ScatterAt  []float64
	Theory     []Curve
	Targets    []Target
	Confidence float64
	Method     string
	Seed       uint64
	// Estimator is how every point's link estimates its BER (sim.Experiment.Estimate);
	// AutoEstimate picks per link.
	Estimator link.Estimator
	// Limits are theory curves no link can beat on a tap (sim.Experiment.Limit); Inputs the
	// files the script read (sim.Experiment.ReadFile), hashed into run.json.
	Limits       []Limit
	Inputs       []result.Input
	AutoEstimate bool
	// Show are the taps the plot and README.md show, the first also the progress line's
	// (sim.Experiment.Show); empty: the taps the rules and targets judge (shownTaps).
	Show []string
	// Named are the taps the script's declarations name (Show's, a stop rule's Tap, a sweep
	// rule's, TargetOn's) with where each was declared: a tap the first point's link does not
	// count is refused at Show (checkShown) and said of the others (warnNamed, namedNotes), as a
	// misspelt name would otherwise be judged on nothing and never met.
	Named []NamedTap
}

// NamedTap is a tap a declaration names: Tap, named by What ("sim.Stop") at At.
type NamedTap struct{ Tap, What, At string }

// NameRules notes the taps rules judge (a declaration What at At).
func (s *Spec) NameRules(what, at string, rules []stop.Rule) {
	for _, t := range ruleTaps(rules) {
		s.Named = append(s.Named, NamedTap{Tap: t, What: what, At: at})
	}
}

// NameTap notes a tap a declaration What at At names.
func (s *Spec) NameTap(what, at, tap string) {
	s.Named = append(s.Named, NamedTap{Tap: tap, What: what, At: at})
}

// NewSpec is a spec with the defaults: 95 % Clopper–Pearson intervals, DefaultSeed.
func NewSpec(name string) Spec {
	return Spec{Name: name, Confidence: 0.95, Method: "clopper-pearson", Seed: DefaultSeed}
}

// Param is a swept parameter: its values, and for SweepLabels the names of its choices.
type Param struct {
	Name   string
	Values []float64
	Labels []string
	// Paired marks the variants of a paired comparison (sim.Experiment.Variants): its values
	// run on common random numbers, the first the reference.
	Paired bool
}

// Curve is a theory curve.
type Curve struct {
	Name string
	Fn   func(p Point) float64
}

// Target asks where a tap crosses a rate, compared with a theory curve when Against is set.
type Target struct {
	Tap     string
	Rate    float64
	Against string
}

// NewExperiment makes a script's experiment bound to the options o. Package sim sets it, since
// sim alone can make a sim.Experiment; the host binds each script's sim.New to it, so a script
// never sees, and cannot choose, how or where it runs.
var NewExperiment func(name string, o *Options) any

// Limit names a theory curve that no link can beat on a tap.
type Limit struct {
	Tap, Curve string
}
