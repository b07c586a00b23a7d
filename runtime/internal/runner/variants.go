package runner

import (
	"context"
	"fmt"
	"math"
	"strings"
	"tally/runtime/framelog"

	"tally/blocks/link"
	"tally/blocks/stats"
	"tally/blocks/stop"
	"tally/runtime/engine"
	"tally/runtime/longrun"
	"tally/runtime/result"
)

// A paired comparison (sim.Experiment.Variants) runs the variants of a design on common random
// numbers: the rows of one point that differ only in the variants axis form a group, computed
// as one engine point on a paired link (link.Paired) whose streams are keyed by the group's
// index and each block's role. The group's committed counts hold every variant's taps and the
// discordant counts of each comparison, so checkpoints and merges keep them as they keep any
// point's counts.

// pairedAxis is the index of the variants parameter, or -1.
func (x *experiment) pairedAxis() int {
	for i, p := range x.Params {
		if p.Paired {
			return i
		}
	}
	return -1
}

// group is one point of the sweep without the variants axis: its rows, one per variant.
type group struct {
	index int     // its index in the sweep without the variants axis: keys the streams
	rows  []Point // rows[v] is variant v's point; rows[0] the reference
	label string  // the point's values without the variants axis
}

// groups splits the grid into the groups of a paired run, in the order of their reference
// rows.
func (x *experiment) groups(points []Point) []group {
	a := x.pairedAxis()
	stride := 1
	for _, p := range x.Params[:a] {
		stride *= len(p.Values)
	}
	nv := len(x.Params[a].Values)
	var gs []group
	for _, pt := range points {
		if pt.Values[a] != 0 {
			continue
		}
		g := group{index: len(gs)}
		for v := range nv {
			g.rows = append(g.rows, points[pt.Index+v*stride])
		}
		var parts []string
		for i, n := range pt.Names {
			if i != a {
				parts = append(parts, n+"="+pt.Label(n))
			}
		}
		g.label = strings.Join(parts, " ")
		gs = append(gs, g)
	}
	return gs
}

// checkPaired refuses what a paired run cannot do, and comparison stop rules without variants.
func (x *experiment) checkPaired(rules []stop.Rule) error {
	a := x.pairedAxis()
	if a < 0 {
		for _, r := range rules {
			if comparisonRule(r) {
				return fmt.Errorf("sim.Stop: the rule %q watches a paired comparison, and the experiment declares no variants (add x.Variants(\"receiver\", \"A\", \"B\"))", r.Name())
			}
		}
		return nil
	}
	switch {
	case a == 0:
		return fmt.Errorf("sim.Variants: %q is the first parameter, the x axis; declare x.Sweep(…) first and the variants after it", x.Params[a].Name)
	case x.Estimator != link.Count || x.AutoEstimate:
		return fmt.Errorf("sim.Variants: a paired comparison counts errors; it cannot run with x.Estimate")
	case len(x.SweepRules) > 0:
		return fmt.Errorf("sim.Variants: sweep rules (x.StopSweep) do not yet run with a paired comparison")
	}
	return nil
}

// comparisonRule reports whether a rule (or one inside stop.All) watches the comparison.
func comparisonRule(r stop.Rule) bool {
	switch r := r.(type) {
	case *stop.DiffShown, *stop.RatioWithin:
		return true
	case *stop.AllOf:
		for _, q := range r.Rules {
			if comparisonRule(q) {
				return true
			}
		}
	}
	return false
}

// runGroups runs every group and adds the rows to run in grid order as they become complete.
func (x *experiment) runGroups(ctx context.Context, run *result.Run, points []Point, rules []stop.Rule, seed uint64, workers int) error {
	rows := make([]*result.Point, len(points))
	checked := false
	flush := func() error {
		for len(run.Points) < len(rows) && rows[len(run.Points)] != nil {
			rp := *rows[len(run.Points)]
			pt := points[len(run.Points)]
			if !checked && rp.Stop != engine.Interrupted && rp.Stop != "skipped" {
				// As the plain path does with its first point (run.go): a tap Show or a rule
				// names that the links do not count.
				if err := x.checkShown(rp); err != nil {
					return err
				}
				x.warnNamed(rp)
				checked = true
			}
			run.Taps = unionTaps(run.Taps, rp.Taps)
			run.Points = append(run.Points, rp)
			if pt.Index >= x.opts.Reported { // a run handed over reports only what is new
				x.report(pt, rp)
			}
			if x.opts.Point != nil && rp.Stop != engine.Interrupted {
				x.opts.Point(run)
			}
			if x.opts.OnPoint != nil {
				x.opts.OnPoint(run, len(points))
			}
		}
		return nil
	}
	for _, g := range x.groups(points) {
		rps, err := x.runGroup(ctx, g, rules, seed, workers)
		if err != nil {
			return err
		}
		if rps[0].Stop == engine.Interrupted && x.opts.handingOver() {
			return ErrInterrupted // the group goes on where the run is handed to
		}
		for v, pt := range g.rows {
			rows[pt.Index] = &rps[v]
		}
		if rps[0].Stop == engine.Interrupted {
			run.Interrupted = true
			// The rows no group reached stay in the table, empty, so the grid is whole.
			for i, r := range rows {
				if r == nil {
					rows[i] = &result.Point{Values: points[i].Values, Stop: "skipped", Note: "the run was interrupted before it"}
				}
			}
		}
		if err := flush(); err != nil {
			return err
		}
		if run.Interrupted {
			break
		}
	}
	return nil
}

// runGroup runs one group's variants on the same frames and returns a row per variant.
func (x *experiment) runGroup(ctx context.Context, g group, rules []stop.Rule, seed uint64, workers int) ([]result.Point, error) {
	a := x.pairedAxis()
	names := x.Params[a].Labels
	build := func() (l *link.Link, err error) {
		if !hosted {
			defer func() {
				if v := recover(); v != nil {
					err = recovered(v)
				}
			}()
		}
		var ls []*link.Link
		for _, pt := range g.rows {
			l := x.Build(pt)
			if l == nil {
				return nil, fmt.Errorf("sim: the Link function returned nil for point %d (%s)", pt.Index, pt.text())
			}
			if l.Estimator() != link.Count {
				return nil, fmt.Errorf("sim.Variants: the link of %s has an estimator: a paired comparison counts errors", pt.text())
			}
			ls = append(ls, l)
		}
		x.fit(g.rows[0], ls...) // the variants send the same bits: one length for all
		return link.Paired(names, ls...), nil
	}
	probe, err := build()
	if err != nil {
		return nil, err
	}
	if err := probe.Check(); err != nil {
		return nil, err
	}
	lay := layoutOf(probe)
	x.custom = engine.HasCustom(probe)
	// The group's fingerprint covers every variant's link: while none changes, the group
	// computes the same frames (a what-changed report then tests nothing).
	fp, wholeScript := linkFingerprint(probe, g.rows[0], seed, x.script)
	where := x.opts.Where
	if where == nil {
		where = func() string { return scriptPos(callers(5)) }
	}
	label := g.label + " " + x.Params[a].Name + "=" + strings.Join(names, "|")
	wrapped := pairedRules(rules, lay)
	spec := engine.Spec{Point: g.index, Label: strings.TrimSpace(label), Build: build, Rules: wrapped, Seed: seed, Workers: workers, Where: where}
	ref := g.rows[0]
	if h := x.opts.handAtPoint(ref.Index); h != nil {
		spec.Observers = append(spec.Observers, h)
	}
	lp := longrun.Point{Index: ref.Index, Values: ref.Values, Label: spec.Label, Fingerprint: fp}
	out, err := x.long.Run(lp, spec, func(s engine.Spec) (engine.Outcome, error) { return x.runEngine(ctx, ref, rules, s) })
	if err != nil {
		return nil, err
	}
	var claim string
	if ev, ok := out.Rule.(*eachVariant); ok {
		if c, ok := ev.inner.(interface{ Method() string }); ok {
			claim = c.Method()
		}
	}
	whole := &stop.Progress{Frames: out.Frames, Taps: out.Taps, Counts: out.Counts}
	pairs := lay.pairs(whole)
	rps := make([]result.Point, len(g.rows))
	for v, pt := range g.rows {
		rp := result.Point{Values: pt.Values, Frames: out.Frames, Stop: out.Stop, Seconds: out.Elapsed.Seconds(), Claim: claim,
			LinkFingerprint: fp + "/" + names[v], WholeScript: wholeScript, RulesFingerprint: x.rulesPrint}
		view := lay.view(whole, v)
		for i, name := range view.Taps {
			tap, err := x.countedTap(name, view.Counts[i])
			if err != nil {
				return nil, err
			}
			rp.Taps = append(rp.Taps, tap)
		}
		if rp.Seconds > 0 && len(rp.Taps) > 0 {
			rp.BitRate = float64(rp.Taps[0].Trials) / rp.Seconds
		}
		for _, c := range x.Theory {
			rp.Theory = append(rp.Theory, c.Fn(pt))
		}
		if v > 0 {
			c := stats.ComparePaired(pairs[v-1], x.Confidence)
			rp.Paired = &result.Comparison{Against: names[0], Variant: names[v],
				RateRef: c.RateA, Rate: c.RateB,
				Diff: c.Diff, DiffLow: c.DiffLow, DiffHigh: c.DiffHigh,
				Ratio: c.Ratio, RatioLow: c.RatioLow, RatioHigh: c.RatioHigh,
				P: c.P, Shown: c.Shown, Verdict: c.VerdictFor(names[0], names[v]), Method: c.Method,
				OnlyRef: pairs[v-1].OnlyA, OnlyVariant: pairs[v-1].OnlyB, Narrower: math.NaN()}
			u := stats.CompareUnpaired(pairs[v-1], x.Confidence)
			if w, wu := c.DiffHigh-c.DiffLow, u.DiffHigh-u.DiffLow; w > 0 && wu > 0 && !math.IsInf(wu, 0) {
				rp.Paired.Narrower = wu / w
			}
		}
		if out.Log.Usable() && out.Log.Frames == out.Frames {
			rp.Log = lay.variantLog(out.Log, v)
		}
		rps[v] = rp
	}
	return rps, nil
}

// variantLog is variant v's own per-frame counts out of a paired point's log (its taps under
// their plain names, as its row holds them), so a later run can compare the variant frame by
// frame as it would a point of its own.
func (lay layout) variantLog(l *framelog.Log, v int) *framelog.Log {
	s, n := lay.start[v], len(lay.taps[v])
	out := framelog.New(n)
	c := make([]link.Tally, n)
	l.Each(l.Frames, func(_, count int64, counts []int64) {
		for i := range c {
			c[i] = link.Tally{Trials: counts[2*(s+i)], Errors: counts[2*(s+i)+1]}
		}
		out.AddN(c, count)
	})
	return out
}

// countedTap is a counted tap's row: its interval for the run's method at a fixed sample
// (the point ends on the slowest variant, so no variant's count stopped at its own error
// target), widened when its errors came in bursts.
func (x *experiment) countedTap(name string, c link.Tally) (result.Tap, error) {
	est, err := stats.ForPoint(c, x.Confidence, x.Method, 0)
	if err != nil {
		return result.Tap{}, err
	}
	bursty, burstMethod := stats.BurstTest(c, burstSignificance)
	if bursty {
		if est, err = stats.Clustered(c, est, x.Confidence, x.Method); err != nil {
			return result.Tap{}, err
		}
	}
	d := stats.Dispersion(c)
	if math.IsNaN(d) {
		d = 0
	}
	return result.Tap{Name: name, Trials: c.Trials, Errors: c.Errors, Rate: est.Rate, Low: est.Low, High: est.High,
		Method: est.Method, Dispersion: d, BurstTest: burstMethod}, nil
}

// layout says where each variant's taps and each comparison's counts lie in a paired link's
// taps.
type layout struct {
	taps  [][]string // per variant, its own tap names
	start []int      // per variant, the index of its first tap
	pair  []int      // per variant after the first, the index of its three comparison taps
}

func layoutOf(l *link.Link) layout {
	var lay layout
	at := 0
	for _, v := range l.Variants() {
		t := v.Taps()
		lay.taps = append(lay.taps, t)
		lay.start = append(lay.start, at)
		at += len(t)
	}
	for range len(l.Variants()) - 1 {
		lay.pair = append(lay.pair, at)
		at += 3
	}
	return lay
}

// view is variant v's own progress within a paired point's: its taps under their plain names,
// and every comparison.
func (lay layout) view(p *stop.Progress, v int) *stop.Progress {
	n := len(lay.taps[v])
	s := lay.start[v]
	return &stop.Progress{Frames: p.Frames, Taps: lay.taps[v], Counts: p.Counts[s : s+n : s+n], Elapsed: p.Elapsed, Pairs: lay.pairs(p)}
}

// pairs are the comparisons of every variant after the first with the reference, on the BER
// tap: both variants' counts and the discordant counts. The frame-level cross sum Σ eA·eB
// follows from the squares: eB − eA = onlyB − onlyA in every frame, and the discordant tap's
// Σ (onlyA + onlyB)² gives Σ onlyA·onlyB.
func (lay layout) pairs(p *stop.Progress) []stats.PairedTally {
	ref := p.Counts[lay.start[0]]
	var out []stats.PairedTally
	for v := 1; v < len(lay.taps); v++ {
		b := p.Counts[lay.start[v]]
		k := lay.pair[v-1]
		oa, ob, dis := p.Counts[k], p.Counts[k+1], p.Counts[k+2]
		crossOnly := float64(dis.Squares-oa.Squares-ob.Squares) / 2
		diffSq := float64(oa.Squares+ob.Squares) - 2*crossOnly // Σ (eB − eA)²
		sa, sb := float64(ref.Squares), float64(b.Squares)
		out = append(out, stats.PairedTally{
			Frames: p.Frames, TrialsA: ref.Trials, TrialsB: b.Trials, ErrorsA: ref.Errors, ErrorsB: b.Errors,
			OnlyA: oa.Errors, OnlyB: ob.Errors, SquaresA: sa, SquaresB: sb,
			Cross: (sa + sb - diffSq) / 2,
		})
	}
	return out
}

// pairedRules are a paired point's rules: each judged on every variant (eachVariant), except
// that two or more rules on the comparison (stop.Shown, stop.Within) are judged together,
// per comparison (settled), in the place of the first of them.
func pairedRules(rules []stop.Rule, lay layout) []stop.Rule {
	var cmp []stop.Rule
	for _, r := range rules {
		switch r.(type) {
		case *stop.DiffShown, *stop.RatioWithin:
			cmp = append(cmp, r)
		}
	}
	var out []stop.Rule
	placed := false
	for _, r := range rules {
		switch r.(type) {
		case *stop.DiffShown, *stop.RatioWithin:
			if len(cmp) > 1 {
				if !placed {
					out = append(out, &settled{rules: cmp, lay: lay})
					placed = true
				}
				continue
			}
		}
		out = append(out, &eachVariant{inner: r, lay: lay})
	}
	return out
}

// settled is met once every comparison of a paired point meets one of its rules: shown
// different, or shown within ±x. Its name is the rules that settled them ("shown", "within",
// or "shown/within" when some comparisons were settled by each).
type settled struct {
	rules []stop.Rule
	lay   layout
	name  string
}

func (r *settled) Met(p *stop.Progress) bool {
	pairs := r.lay.pairs(p)
	used := make([]bool, len(r.rules))
	for k := range pairs {
		one := &stop.Progress{Frames: p.Frames, Elapsed: p.Elapsed, Pairs: pairs[k : k+1]}
		met := false
		for i, q := range r.rules {
			if q.Met(one) {
				used[i], met = true, true
				break
			}
		}
		if !met {
			return false
		}
	}
	var names []string
	for i, q := range r.rules {
		if used[i] {
			names = append(names, q.Name())
		}
	}
	r.name = strings.Join(names, "/")
	return len(pairs) > 0
}

func (r *settled) Name() string {
	if r.name == "" {
		var names []string
		for _, q := range r.rules {
			names = append(names, q.Name())
		}
		return strings.Join(names, "/")
	}
	return r.name
}

func (r *settled) Err() error {
	for _, q := range r.rules {
		if c, ok := q.(link.Checked); ok {
			if err := c.Err(); err != nil {
				return err
			}
		}
	}
	return nil
}

// eachVariant is a stop rule judged on a paired point: met when it is met on every variant's
// own counts (a rule that watches the comparison sees every comparison in each).
type eachVariant struct {
	inner stop.Rule
	lay   layout
}

func (r *eachVariant) Met(p *stop.Progress) bool {
	for v := range r.lay.taps {
		if !r.inner.Met(r.lay.view(p, v)) {
			return false
		}
	}
	return true
}

func (r *eachVariant) Name() string { return r.inner.Name() }

func (r *eachVariant) Err() error {
	if c, ok := r.inner.(link.Checked); ok {
		return c.Err()
	}
	return nil
}
