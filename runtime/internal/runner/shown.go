package runner

import (
	"fmt"
	"slices"
	"strings"

	"tally/blocks/link"
	"tally/blocks/stop"
	"tally/runtime/result"
)

// ruleTaps are the taps the stop rules judge, in the order the script gave them (inside All
// too): the tap of an error count, a precision, a below or above claim. Bits, frames and time
// judge no tap of the script's choosing and name none.
func ruleTaps(rules []stop.Rule) []string {
	var taps []string
	add := func(on string) {
		if on == "" {
			on = link.TapBER
		}
		if !slices.Contains(taps, on) {
			taps = append(taps, on)
		}
	}
	var walk func(rules []stop.Rule)
	walk = func(rules []stop.Rule) {
		for _, r := range rules {
			switch r := r.(type) {
			case *stop.ErrorTarget:
				add(r.On)
			case *stop.WidthRatio:
				add(r.On)
			case *stop.ShownBelow:
				add(r.On)
			case *stop.ShownAbove:
				add(r.On)
			case *stop.AllOf:
				walk(r.Rules)
			}
		}
	}
	walk(rules)
	return taps
}

// ruleSpecs are the rates the stop rules claim a tap below or above, for the plot's lines.
func ruleSpecs(rules []stop.Rule) []result.Spec {
	var specs []result.Spec
	tap := func(on string) string {
		if on == "" {
			return link.TapBER
		}
		return on
	}
	var walk func(rules []stop.Rule)
	walk = func(rules []stop.Rule) {
		for _, r := range rules {
			switch r := r.(type) {
			case *stop.ShownBelow:
				specs = append(specs, result.Spec{Tap: tap(r.On), Rate: r.Target, Rule: "below"})
			case *stop.ShownAbove:
				specs = append(specs, result.Spec{Tap: tap(r.On), Rate: r.Target, Rule: "above"})
			case *stop.AllOf:
				walk(r.Rules)
			}
		}
	}
	walk(rules)
	return specs
}

// shownTaps are the taps the plot and README.md show, the governing one first: the script's
// own choice (sim.Experiment.Show), else the taps its stop rules judge and then those its
// targets cross, else the BER tap.
func (x *experiment) shownTaps(rules []stop.Rule) []string {
	if len(x.Show) > 0 {
		return slices.Clone(x.Show)
	}
	taps := ruleTaps(rules)
	for _, t := range x.Targets {
		if !slices.Contains(taps, t.Tap) {
			taps = append(taps, t.Tap)
		}
	}
	if len(taps) == 0 {
		taps = []string{link.TapBER}
	}
	return taps
}

// checkShown refuses, at the script's Show, a tap the first point's link does not count (a
// misspelt name would otherwise show the BER without a word). The pre-decoder tap is left to
// the end of the run, since an uncoded first curve lacks it.
func (x *experiment) checkShown(rp result.Point) error {
	for _, n := range x.Named {
		if n.What == "sim.Show" && !counts(rp, n.Tap) {
			return &Failure{Pos: n.At, Err: fmt.Errorf("sim.Show: the link counts no tap %q (it counts %s)", n.Tap, strings.Join(counted(rp), ", "))}
		}
	}
	return nil
}

// counts reports whether the point's link counts tap (the pre-decoder tap always, see
// checkShown).
func counts(rp result.Point, tap string) bool {
	return tap == link.TapPre || slices.ContainsFunc(rp.Taps, func(t result.Tap) bool { return t.Name == tap && !t.Absent })
}

// counted are the taps the point's link counts.
func counted(rp result.Point) []string {
	var have []string
	for _, t := range rp.Taps {
		if !t.Absent {
			have = append(have, t.Name)
		}
	}
	return have
}

// warnNamed says at once, on the log, when the first point's link counts no tap a declaration
// names (stop.Errors(100).Tap("paylod")): a rule on it is never met there and a target never
// crossed. It is not refused, since a later curve's link may count the tap; namedNotes puts
// the names no point counted into the outputs.
func (x *experiment) warnNamed(rp result.Point) {
	for _, n := range x.Named {
		if n.What != "sim.Show" && !counts(rp, n.Tap) {
			x.opts.logf("note: %s: %s names the tap %q, which the first point's link does not count (it counts %s): a rule on it is never met there\n",
				n.At, n.What, n.Tap, strings.Join(counted(rp), ", "))
		}
	}
}

// namedNotes notes in the run each tap a declaration names that no point counted.
func (x *experiment) namedNotes(run *result.Run) {
	for _, n := range x.Named {
		if n.Tap != link.TapPre && run.TapIndex(n.Tap) < 0 {
			run.Notes = append(run.Notes, fmt.Sprintf("%s (%s) names the tap %q, which no link in the run counts: a rule on it was never met.", n.What, n.At, n.Tap))
		}
	}
}

// settleShown keeps of run.Shown the taps some point counted (a rule or target on a tap the
// link lacks names nothing to draw), and the BER tap when none is left.
func settleShown(run *result.Run) {
	var kept []string
	for _, name := range run.Shown {
		if run.TapIndex(name) >= 0 {
			kept = append(kept, name)
		}
	}
	if len(kept) == 0 {
		kept = []string{link.TapBER}
	}
	run.Shown = kept
}

// Here names the script statement being run ("file:line:col" hosted, "file:line" compiled),
// for a declaration that is checked later, when the run has counted its first point.
func (o *Options) Here() string { return o.where(3) }
