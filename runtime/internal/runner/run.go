package runner

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	goruntime "runtime"
	"slices"
	"strings"
	"time"

	"tally/blocks/link"
	"tally/blocks/stats"
	"tally/blocks/stop"
	"tally/runtime/engine"
	"tally/runtime/longrun"
	"tally/runtime/output"
	"tally/runtime/result"
)

// Version is tally's version, recorded in every run record.
const Version = "0.1.0"

// burstSignificance is the level of the burst test (stats.BurstTest) at which a tap's errors
// count as bursty and its interval is widened: small, so independent errors are widened by
// chance in at most 1 point in 1000.
const burstSignificance = 0.001

// ErrInterrupted is the error of a run ended by Ctrl-C (its finished points are written).
var ErrInterrupted = errors.New("run interrupted")

// experiment is a declared experiment with the options it runs under.
type experiment struct {
	*Spec
	opts   *Options
	long   *longrun.Session // checkpoint, shard or replay (nil: none)
	tap    string           // the governing tap: the one the progress line counts
	frames frameFit         // frame lengths rounded up (framefit.go)
	// script is the script's identity for fingerprints (its bytes and the files it read),
	// rulesPrint the stop rules' fingerprint; prev the last good run's points by link
	// fingerprint, when Options.Reuse (reuse.go).
	script     string
	rulesPrint string
	prev       map[string]*result.Point
	// custom says the running point's link has a block of the script's own (engine.HasCustom).
	custom bool
}

// Run runs a script's experiment (sim.Experiment.Run): every point, then table.csv, run.json,
// the plots and README.md into the folder named after the script beside it. A mistake stops
// the script with file:line: message; so does a second experiment in one script, whose
// outputs would go to the same folder.
func Run(s *Spec, o *Options) {
	x := &experiment{Spec: s, opts: o}
	at := o.where(3)
	if o.ran != "" {
		Fail(&Failure{Pos: at, Err: fmt.Errorf("sim: this script already ran the experiment %q, whose outputs are in %s; "+
			"a script runs one experiment: put %q in a file of its own, or sweep both as choices of one experiment (x.SweepLabels)",
			o.ran, output.Dir(o.Script)+string(filepath.Separator), s.Name)})
	}
	o.ran = s.Name
	if child != nil {
		child.started()
	}
	begin()
	r, err := x.execute()
	ended()
	if errors.Is(err, ErrInterrupted) && o.handingOver() {
		// Stopped at a commit boundary for a hand-over: the checkpoint holds the committed
		// prefix and the program the run is handed to writes the outputs.
		if hosted {
			panic(err)
		}
		r = nil
	}
	if err != nil && !errors.Is(err, ErrInterrupted) {
		var f *Failure
		var pe *engine.PanicError
		switch {
		case errors.As(err, &f):
		case errors.As(err, &pe) && pe.Where != "":
			err = &Failure{Pos: pe.Where, Err: err}
		default:
			err = &Failure{Pos: at, Err: err}
		}
		Fail(err)
	}
	if r != nil {
		if werr := x.write(r); werr != nil {
			Fail(werr)
		}
	}
	if errors.Is(err, ErrInterrupted) {
		if hosted {
			panic(err)
		}
		if child != nil {
			child.end(err)
			os.Exit(0)
		}
		fmt.Fprintln(os.Stderr, "interrupted: finished points written")
		os.Exit(130)
	}
	if child != nil {
		child.end(nil) // the script's main goes on; tally waits for the process to end
	}
}

// Execute runs the sweep and returns its result without writing files. The result of an
// interrupted run holds the finished points and the interrupted one, with ErrInterrupted.
func Execute(s *Spec, o *Options) (*result.Run, error) {
	return (&experiment{Spec: s, opts: o}).execute()
}

func (x *experiment) execute() (*result.Run, error) {
	o := x.opts
	if x.Build == nil {
		return nil, fmt.Errorf("sim: the experiment has no Link")
	}
	if len(x.Params) == 0 {
		return nil, fmt.Errorf("sim: the experiment sweeps nothing (add x.Sweep(\"ebn0_db\", …))")
	}
	ctx := o.Context
	if ctx == nil {
		ctx = context.Background()
	}
	seed := x.Seed
	if o.SeedSet {
		seed = o.Seed
	}
	workers := o.Workers
	if workers <= 0 {
		workers = goruntime.NumCPU()
	}
	if _, err := stats.ForPoint(link.Tally{}, x.Confidence, x.Method, 0); err != nil {
		return nil, fmt.Errorf("sim.Interval: %w", err)
	}
	rules := x.Rules
	if len(rules) == 0 {
		rules = []stop.Rule{stop.Errors(100), stop.Bits(1e9)}
	}
	if err := x.checkPaired(rules); err != nil {
		return nil, err
	}
	sum := sha256.Sum256(o.Source)
	var err error
	x.long, err = longrun.Open(o.Long, longrun.Job{Name: x.Name, Script: o.Script, SHA256: hex.EncodeToString(sum[:]),
		Seed: seed, Dir: output.Dir(o.Script), Logf: o.logf})
	if err != nil {
		return nil, err
	}
	run := &result.Run{
		Name: x.Name, Script: filepath.Base(o.Script), ScriptSHA256: hex.EncodeToString(sum[:]),
		Tool: Version, GoVersion: goruntime.Version(), Mode: o.Mode, Seed: seed, Workers: workers,
		Confidence: x.Confidence, Method: x.Method, Start: time.Now().UTC(),
	}
	if o.Mode == "compiled" && child == nil {
		run.Execution = &result.Execution{How: "compiled"} // go run (tally itself records a hand-over)
	}
	for _, p := range x.Params {
		run.Params = append(run.Params, p.Name)
	}
	run.Labels = x.labels()
	run.Inputs = x.Inputs
	for _, c := range x.Theory {
		run.Theory = append(run.Theory, c.Name)
	}
	run.Shown = x.shownTaps(rules)
	run.Specs = ruleSpecs(rules)
	x.tap = run.Shown[0]
	x.script = scriptIdentity(o.Source, x.Inputs)
	x.rulesPrint = rulesFingerprint(rules, x.Confidence, x.Method, x.script)
	if o.Reuse {
		x.prev = previous(output.Dir(o.Script))
	}
	points := x.grid()
	checked := false
	loop := points
	if x.pairedAxis() >= 0 {
		// A paired comparison runs a point's variants together (variants.go).
		if err := x.runGroups(ctx, run, points, rules, seed, workers); err != nil {
			if errors.Is(err, ErrInterrupted) {
				return run, err
			}
			return nil, err
		}
		loop = nil
	}
	for _, pt := range loop {
		if skip, why := x.skip(run, pt); skip {
			run.Points = append(run.Points, x.skipped(run, pt, why))
			if pt.Index >= o.Reported {
				x.opts.logf("%s  skipped: %s\n", pt.text(), why)
			}
			if o.OnPoint != nil {
				o.OnPoint(run, len(points))
			}
			continue
		}
		rp, err := x.runPoint(ctx, pt, rules, seed, workers)
		if err != nil {
			return nil, err
		}
		if rp.Stop == engine.Interrupted && o.handingOver() {
			return run, ErrInterrupted // the point goes on where the run is handed to
		}
		if !checked && rp.Stop != engine.Interrupted {
			if err := x.checkShown(rp); err != nil {
				return nil, err
			}
			x.warnNamed(rp)
			checked = true
		}
		run.Taps = unionTaps(run.Taps, rp.Taps)
		run.Points = append(run.Points, rp)
		if pt.Index >= o.Reported {
			x.report(pt, rp)
		}
		if o.Point != nil && rp.Stop != engine.Interrupted {
			o.Point(run)
		}
		if o.OnPoint != nil {
			o.OnPoint(run, len(points))
		}
		if rp.Stop == engine.Interrupted {
			run.Interrupted = true
			break
		}
	}
	run.End = time.Now().UTC()
	run.Shards = x.long.Record()
	alignTaps(run)
	settleShown(run)
	x.namedNotes(run)
	x.frameNotes(run)
	x.findTargets(run)
	x.checkLimits(run)
	if !run.Interrupted {
		if err := x.scatter(run, points, seed); err != nil {
			return nil, err
		}
	}
	if run.Interrupted {
		return run, ErrInterrupted
	}
	return run, nil
}

func (x *experiment) runPoint(ctx context.Context, pt Point, rules []stop.Rule, seed uint64, workers int) (rp result.Point, err error) {
	build := func() (l *link.Link, err error) {
		if !hosted {
			defer func() {
				if v := recover(); v != nil {
					err = recovered(v)
				}
			}()
		}
		l = x.Build(pt)
		if l == nil {
			return nil, fmt.Errorf("sim: the Link function returned nil for point %d (%s)", pt.Index, pt.text())
		}
		x.fit(pt, l)
		x.estimateOn(l)
		return l, nil
	}
	where := x.opts.Where
	if where == nil {
		where = func() string { return scriptPos(callers(5)) }
	}
	// The point's link is built once here for its fingerprint, and handed to the engine as
	// the first of its links.
	first, err := build()
	if err != nil {
		return rp, err
	}
	fp, whole := linkFingerprint(first, pt, seed, x.script)
	x.custom = engine.HasCustom(first)
	handed := false
	engineBuild := func() (*link.Link, error) {
		if !handed {
			handed = true
			return first, nil
		}
		return build()
	}
	spec := engine.Spec{Point: pt.Index, Label: pt.text(), Build: engineBuild, Rules: rules, Seed: seed, Workers: workers, Where: where}
	if h := x.opts.handAtPoint(pt.Index); h != nil {
		spec.Observers = append(spec.Observers, h)
	}
	// The long-run session adds the checkpoint, shard or replay around the engine run.
	lp := longrun.Point{Index: pt.Index, Values: pt.Values, Label: pt.text(), Fingerprint: fp}
	var reused int64
	out, err := x.long.Run(lp, spec, func(s engine.Spec) (engine.Outcome, error) {
		out, n, err := x.reuseOrRun(ctx, pt, rules, s, x.prev[fp])
		reused = n
		return out, err
	})
	if err != nil {
		return rp, err
	}
	rp = result.Point{Values: pt.Values, Frames: out.Frames, Stop: out.Stop, Seconds: out.Elapsed.Seconds(),
		LinkFingerprint: fp, WholeScript: whole, RulesFingerprint: x.rulesPrint, FramesReused: reused}
	if out.Log.Usable() && out.Log.Frames == out.Frames {
		rp.Log = out.Log
	}
	if c, ok := out.Rule.(interface{ Method() string }); ok {
		rp.Claim = c.Method()
	}
	// The inverse sampling interval holds on the tap of the error count that ended the point
	// (stop.EndedBy: an All ended by its other rules is a fixed-sample count).
	ended := stop.EndedBy(out.Rule, &stop.Progress{Frames: out.Frames, Taps: out.Taps, Counts: out.Counts})
	for i, name := range out.Taps {
		var target int64
		if ended != nil && ended.On == name {
			target = ended.Count
		}
		c := out.Counts[i]
		if c.Estimator != link.Count { // importance sampling, semi-analytic (estimate.go)
			tap, err := weightedTap(name, c, x.Confidence)
			if err != nil {
				return rp, err
			}
			rp.Taps = append(rp.Taps, tap)
			continue
		}
		est, err := stats.ForPoint(c, x.Confidence, x.Method, target)
		if err != nil {
			return rp, err
		}
		// Errors shown to come in bursts break the independence every binomial interval rests
		// on: widen the interval by the frames' dispersion rather than report it too narrow.
		bursty, burstMethod := stats.BurstTest(c, burstSignificance)
		if bursty {
			if est, err = stats.Clustered(c, est, x.Confidence, x.Method); err != nil {
				return rp, err
			}
		}
		d := stats.Dispersion(c)
		if math.IsNaN(d) {
			d = 0
		}
		rp.Taps = append(rp.Taps, result.Tap{Name: name, Trials: c.Trials, Errors: c.Errors,
			Rate: est.Rate, Low: est.Low, High: est.High, Method: est.Method, Dispersion: d, BurstTest: burstMethod})
	}
	if rp.Seconds > 0 && len(rp.Taps) > 0 {
		rp.BitRate = float64(rp.Taps[0].Trials) / rp.Seconds
	}
	for _, c := range x.Theory {
		rp.Theory = append(rp.Theory, c.Fn(pt))
	}
	return rp, nil
}

// unionTaps adds the tap names of a point not yet in names: curves of one run may count
// different taps (an uncoded curve has no pre-FEC tap).
func unionTaps(names []string, taps []result.Tap) []string {
	for _, t := range taps {
		if !slices.Contains(names, t.Name) {
			names = append(names, t.Name)
		}
	}
	return names
}

// alignTaps puts every point's taps in the run's order, marking those its link did not count.
func alignTaps(run *result.Run) {
	for i := range run.Points {
		p := &run.Points[i]
		aligned := make([]result.Tap, len(run.Taps))
		for k, name := range run.Taps {
			aligned[k] = result.Tap{Name: name, Absent: true}
			for _, t := range p.Taps {
				if t.Name == name {
					aligned[k] = t
				}
			}
		}
		p.Taps = aligned
	}
}

// grid lists the points: the first parameter varies fastest, so each curve's points are
// consecutive.
func (x *experiment) grid() []Point {
	names := make([]string, len(x.Params))
	labels := make([][]string, len(x.Params))
	n := 1
	for i, p := range x.Params {
		names[i], labels[i] = p.Name, p.Labels
		n *= len(p.Values)
	}
	pts := make([]Point, n)
	for k := range pts {
		v := make([]float64, len(x.Params))
		rem := k
		for i, p := range x.Params {
			v[i] = p.Values[rem%len(p.Values)]
			rem /= len(p.Values)
		}
		pts[k] = Point{Index: k, Names: names, Values: v, Labels: labels}
	}
	return pts
}

func (x *experiment) report(pt Point, rp result.Point) {
	x.opts.logf("%s\n", x.finishedLine(pt, rp))
}

type curveView struct {
	label  string
	points []result.Point
}

// curves splits the points into curves along the x axis (one per value of the other parameters).
func (x *experiment) curves(run *result.Run) []curveView {
	nx := len(x.Params[0].Values)
	var cs []curveView
	for i := 0; i+nx <= len(run.Points); i += nx {
		pts := run.Points[i : i+nx]
		var lab []string
		for k := 1; k < len(x.Params); k++ {
			pt := Point{Names: run.Params, Values: pts[0].Values, Labels: x.labels()}
			lab = append(lab, x.Params[k].Name+"="+pt.Label(x.Params[k].Name))
		}
		cs = append(cs, curveView{label: strings.Join(lab, " "), points: pts})
	}
	return cs
}

func (x *experiment) labels() [][]string {
	l := make([][]string, len(x.Params))
	for i, p := range x.Params {
		l[i] = p.Labels
	}
	return l
}

func (x *experiment) write(r *result.Run) error {
	skip, err := x.long.Finish() // a shard run saves its shard file instead of the outputs
	if err != nil {
		return err
	}
	if x.opts.Done != nil {
		if err := x.opts.Done(r); err != nil {
			return err
		}
	}
	if skip {
		return nil
	}
	dir := output.Dir(x.opts.Script)
	write := output.Write
	if x.opts.Output != nil {
		write = x.opts.Output
	}
	if err := write(dir, r); err != nil {
		return err
	}
	return x.long.Written(r.Interrupted)
}
