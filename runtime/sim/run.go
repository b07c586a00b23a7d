package sim

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
	"tally/runtime/output"
	"tally/runtime/result"
)

// Version is tally's version, recorded in every run record.
const Version = "0.1.0"

// burstSignificance is the level of the index-of-dispersion test above which a tap's errors
// count as bursty and its interval is widened: small, so independent errors are almost never
// widened by chance.
const burstSignificance = 0.001

// ErrInterrupted is the error of a run ended by Ctrl-C (its finished points are written).
var ErrInterrupted = errors.New("run interrupted")

// Run runs every point and writes table.csv, run.json, the plots and README.md into the folder
// named after the script beside it. A mistake stops the script with file:line: message.
func (x *Experiment) Run() {
	at := x.opts.where(3)
	r, err := x.Execute()
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
		fail(err)
	}
	if r != nil {
		if werr := x.write(r); werr != nil {
			fail(werr)
		}
	}
	if errors.Is(err, ErrInterrupted) {
		if hosted {
			panic(err)
		}
		fmt.Fprintln(os.Stderr, "interrupted: finished points written")
		os.Exit(130)
	}
}

// Execute runs the sweep and returns its result without writing files. The result of an
// interrupted run holds the finished points and the interrupted one, with ErrInterrupted.
func (x *Experiment) Execute() (*result.Run, error) {
	o := x.opts
	if x.build == nil {
		return nil, fmt.Errorf("sim: the experiment has no Link")
	}
	if len(x.params) == 0 {
		return nil, fmt.Errorf("sim: the experiment sweeps nothing (add x.Sweep(\"ebn0_db\", …))")
	}
	ctx := o.Context
	if ctx == nil {
		ctx = context.Background()
	}
	seed := x.seed
	if o.SeedSet {
		seed = o.Seed
	}
	workers := o.Workers
	if workers <= 0 {
		workers = goruntime.NumCPU()
	}
	if _, err := stats.ForPoint(link.Tally{}, x.confidence, x.method, 0); err != nil {
		return nil, fmt.Errorf("sim.Interval: %w", err)
	}
	rules := x.rules
	if len(rules) == 0 {
		rules = []stop.Rule{stop.Errors(100), stop.Bits(1e9)}
	}
	sum := sha256.Sum256(o.Source)
	run := &result.Run{
		Name: x.name, Script: filepath.Base(o.Script), ScriptSHA256: hex.EncodeToString(sum[:]),
		Tool: Version, GoVersion: goruntime.Version(), Mode: o.Mode, Seed: seed, Workers: workers,
		Confidence: x.confidence, Method: x.method, Start: time.Now().UTC(),
	}
	for _, p := range x.params {
		run.Params = append(run.Params, p.name)
	}
	run.Labels = x.labels()
	for _, c := range x.theory {
		run.Theory = append(run.Theory, c.name)
	}
	points := x.grid()
	for _, pt := range points {
		if skip, why := x.skip(run, pt); skip {
			run.Points = append(run.Points, x.skipped(run, pt, why))
			x.opts.logf("%s  skipped: %s\n", pt.text(), why)
			if o.OnPoint != nil {
				o.OnPoint(run, len(points))
			}
			continue
		}
		rp, err := x.runPoint(ctx, pt, rules, seed, workers)
		if err != nil {
			return nil, err
		}
		run.Taps = unionTaps(run.Taps, rp.Taps)
		run.Points = append(run.Points, rp)
		x.report(pt, rp)
		if o.OnPoint != nil {
			o.OnPoint(run, len(points))
		}
		if rp.Stop == engine.Interrupted {
			run.Interrupted = true
			break
		}
	}
	run.End = time.Now().UTC()
	alignTaps(run)
	x.findTargets(run)
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

func (x *Experiment) runPoint(ctx context.Context, pt Point, rules []stop.Rule, seed uint64, workers int) (rp result.Point, err error) {
	build := func() (l *link.Link, err error) {
		if !hosted {
			defer func() {
				if v := recover(); v != nil {
					err = recovered(v)
				}
			}()
		}
		l = x.build(pt)
		if l == nil {
			return nil, fmt.Errorf("sim: the Link function returned nil for point %d", pt.Index+1)
		}
		return l, nil
	}
	where := x.opts.Where
	if where == nil {
		where = func() string { return scriptPos(callers(5)) }
	}
	spec := engine.Spec{Point: pt.Index, Build: build, Rules: rules, Seed: seed, Workers: workers, Where: where}
	// runLong (longrun.go) adds the checkpoint, shard or replay around the engine run.
	out, err := x.runLong(pt, spec, func(s engine.Spec) (engine.Outcome, error) { return x.runEngine(ctx, pt, rules, s) })
	if err != nil {
		return rp, err
	}
	rp = result.Point{Values: pt.Values, Frames: out.Frames, Stop: out.Stop, Seconds: out.Elapsed.Seconds()}
	for i, name := range out.Taps {
		var target int64
		if et, ok := out.Rule.(*stop.ErrorTarget); ok && et.On == name {
			target = et.Count
		}
		c := out.Counts[i]
		est, err := stats.ForPoint(c, x.confidence, x.method, target)
		if err != nil {
			return rp, err
		}
		// Errors shown to come in bursts break the independence every binomial interval rests
		// on: widen the interval by the frames' dispersion rather than report it too narrow.
		if stats.Bursty(c, burstSignificance) {
			if est, err = stats.Clustered(c, est, x.confidence, x.method); err != nil {
				return rp, err
			}
		}
		d := stats.Dispersion(c)
		if math.IsNaN(d) {
			d = 0
		}
		rp.Taps = append(rp.Taps, result.Tap{Name: name, Trials: c.Trials, Errors: c.Errors,
			Rate: est.Rate, Low: est.Low, High: est.High, Method: est.Method, Dispersion: d})
	}
	if rp.Seconds > 0 && len(rp.Taps) > 0 {
		rp.BitRate = float64(rp.Taps[0].Trials) / rp.Seconds
	}
	for _, c := range x.theory {
		rp.Theory = append(rp.Theory, c.fn(pt))
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
func (x *Experiment) grid() []Point {
	names := make([]string, len(x.params))
	labels := make([][]string, len(x.params))
	n := 1
	for i, p := range x.params {
		names[i], labels[i] = p.name, p.labels
		n *= len(p.values)
	}
	pts := make([]Point, n)
	for k := range pts {
		v := make([]float64, len(x.params))
		rem := k
		for i, p := range x.params {
			v[i] = p.values[rem%len(p.values)]
			rem /= len(p.values)
		}
		pts[k] = Point{Index: k, Names: names, Values: v, labels: labels}
	}
	return pts
}

func (x *Experiment) report(pt Point, rp result.Point) {
	x.opts.logf("%s\n", finishedLine(pt, rp))
}

type curveView struct {
	label  string
	points []result.Point
}

// curves splits the points into curves along the x axis (one per value of the other parameters).
func (x *Experiment) curves(run *result.Run) []curveView {
	nx := len(x.params[0].values)
	var cs []curveView
	for i := 0; i+nx <= len(run.Points); i += nx {
		pts := run.Points[i : i+nx]
		var lab []string
		for k := 1; k < len(x.params); k++ {
			pt := Point{Names: run.Params, Values: pts[0].Values, labels: x.labels()}
			lab = append(lab, x.params[k].name+"="+pt.Label(x.params[k].name))
		}
		cs = append(cs, curveView{label: strings.Join(lab, " "), points: pts})
	}
	return cs
}

func (x *Experiment) labels() [][]string {
	l := make([][]string, len(x.params))
	for i, p := range x.params {
		l[i] = p.labels
	}
	return l
}

func (x *Experiment) write(r *result.Run) error {
	skip, err := x.finishLong(r) // a shard run saves its shard file instead of the outputs
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
	dir := OutputDir(x.opts.Script)
	if err := output.Write(dir, r); err != nil {
		return err
	}
	return x.writtenLong(r)
}

// OutputDir is the folder beside a script that holds its outputs: dir/<name>.go → dir/<name>.
func OutputDir(script string) string {
	return strings.TrimSuffix(script, filepath.Ext(script))
}
