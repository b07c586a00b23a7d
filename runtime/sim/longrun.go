package sim

import (
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"os"
	"slices"
	"strings"
	"time"

	"tally/blocks/link"
	"tally/blocks/stop"
	"tally/runtime/engine"
	"tally/runtime/longrun"
	"tally/runtime/result"
)

// Long runs. With Options.Long set, a run keeps a checkpoint of its committed counts in its
// outputs folder (resume), or computes one shard of every point's frames and keeps a shard
// file instead of writing outputs, or replays merged shard files instead of computing. The
// engine's committed prefix is the only state in each case, so a resumed, a merged and an
// uninterrupted run give the same table.
//
// A wall-time stop rule cannot be replayed: a resumed point keeps the wall time it had spent,
// but where it then stops depends on the machine; a merge sees no wall time at all.

const (
	checkpointing = iota
	sharding
	replaying
)

// longRun is the long-run state of one experiment while it runs.
type longRun struct {
	x     *Experiment
	set   *longrun.Settings
	mode  int
	dir   string // outputs folder
	path  string // checkpoint or shard file
	every time.Duration
	next  time.Time // when the next periodic save is due
	warn  bool      // a failed save was reported

	ck    *longrun.Checkpoint // checkpointing: what is saved
	old   *longrun.Checkpoint // the checkpoint resumed from
	sh    *longrun.ShardFile  // sharding: what is saved
	plan  *longrun.Plan       // the plan a short merge left, for -extend
	short []longrun.ShortPoint
}

// longFor is the experiment's long-run state, made at its first point; nil without settings.
func (x *Experiment) longFor(seed uint64) (*longRun, error) {
	o := x.opts
	if o.Long == nil {
		return nil, nil
	}
	if o.long != nil && o.long.x == x {
		return o.long, nil
	}
	sum := sha256.Sum256(o.Source)
	hash := hex.EncodeToString(sum[:])
	set := o.Long
	l := &longRun{x: x, set: set, dir: OutputDir(o.Script), every: set.Interval()}
	var err error
	switch {
	case set.Replay != nil:
		l.mode = replaying
		m := set.Replay
		switch {
		case m.SHA256 != hash:
			err = fmt.Errorf("merge: the shards were made by another version of %s (SHA-256 %.12s…, the script now %.12s…)", o.Script, m.SHA256, hash)
		case m.Seed != seed:
			err = fmt.Errorf("merge: the shards have seed %d, the run seed %d", m.Seed, seed)
		case m.Name != x.name:
			err = fmt.Errorf("merge: the shards are of experiment %q, the script runs %q", m.Name, x.name)
		}
	case set.Shard != nil:
		l.mode = sharding
		err = l.openShard(hash, seed)
	default:
		l.mode = checkpointing
		err = l.openCheckpoint(hash, seed)
	}
	if err != nil {
		return nil, err
	}
	l.next = time.Now().Add(l.every)
	o.long = l
	return l, nil
}

func (l *longRun) openCheckpoint(hash string, seed uint64) error {
	o := l.x.opts
	l.path = longrun.CheckpointPath(l.dir)
	l.ck = &longrun.Checkpoint{Name: l.x.name, Script: o.Script, SHA256: hash, Seed: seed}
	if l.set.Restart {
		if err := os.Remove(l.path); err != nil && !errors.Is(err, os.ErrNotExist) {
			return err
		}
		return nil
	}
	old, err := longrun.LoadCheckpoint(l.path)
	switch {
	case errors.Is(err, os.ErrNotExist):
		if l.set.Resume {
			o.logf("resume: no checkpoint in %s; starting afresh\n", l.dir)
		}
		return nil
	case !l.set.Resume:
		o.logf("note: replacing the checkpoint of an earlier unfinished run (-resume would continue it)\n")
		return nil
	case err != nil:
		return fmt.Errorf("resume: %w; run with -restart to start afresh", err)
	}
	if err := l.match("resume: the checkpoint "+l.path, old.Name, old.SHA256, old.Seed, hash, seed); err != nil {
		return err
	}
	l.old = old
	// Until a point is run again, the checkpoint keeps what the old one had of it.
	l.ck.Points = append([]longrun.PointState(nil), old.Points...)
	done, at := 0, ""
	for _, p := range old.Points {
		if p.Stop != "" {
			done++
		} else {
			at = fmt.Sprintf(", point %d from frame %d", p.Index+1, p.Frames)
		}
	}
	o.logf("resume: %d finished point(s)%s, from %s\n", done, at, l.path)
	return nil
}

// match refuses saved work of another experiment, script version or seed.
func (l *longRun) match(what, name, savedHash string, savedSeed uint64, hash string, seed uint64) error {
	switch {
	case name != l.x.name:
		return fmt.Errorf("%s is of experiment %q, the script runs %q; run with -restart to start afresh", what, name, l.x.name)
	case savedHash != hash:
		return fmt.Errorf("%s was made by another version of the script (SHA-256 %.12s…, the script now %.12s…); run with -restart to start afresh", what, savedHash, hash)
	case savedSeed != seed:
		return fmt.Errorf("%s was made with seed %d, this run has seed %d; give -seed %d to continue it, or -restart to start afresh", what, savedSeed, seed, savedSeed)
	}
	return nil
}

func (l *longRun) openShard(hash string, seed uint64) error {
	o := l.x.opts
	part := *l.set.Shard
	l.path = longrun.ShardPath(l.dir, part)
	l.sh = &longrun.ShardFile{Name: l.x.name, Script: o.Script, SHA256: hash, Seed: seed, Index: part.Index, Of: part.Of}
	if l.set.Restart {
		if err := os.Remove(l.path); err != nil && !errors.Is(err, os.ErrNotExist) {
			return err
		}
		return nil
	}
	old, err := longrun.LoadShard(l.path)
	cont := l.set.Extend || l.set.Resume
	switch {
	case errors.Is(err, os.ErrNotExist):
		if cont {
			o.logf("shard %s: no shard file %s yet; starting afresh\n", part, l.path)
		}
		return nil
	case !cont:
		o.logf("note: replacing the shard file %s (-extend would continue it)\n", l.path)
		return nil
	case err != nil:
		return fmt.Errorf("shard: %w; run with -restart to start afresh", err)
	}
	if err := l.match("shard: "+l.path, old.Name, old.SHA256, old.Seed, hash, seed); err != nil {
		return err
	}
	if old.Index != part.Index || old.Of != part.Of {
		return fmt.Errorf("shard: %s holds shard %d/%d, not %s", l.path, old.Index, old.Of, part)
	}
	l.sh = old
	if l.set.Extend {
		plan, err := longrun.LoadPlan(longrun.PlanPath(l.dir))
		switch {
		case errors.Is(err, os.ErrNotExist):
		case err != nil:
			return fmt.Errorf("extend: %w", err)
		case plan.SHA256 == hash && plan.Seed == seed && plan.Of == part.Of:
			l.plan = plan
		default:
			o.logf("extend: ignoring %s, left by a merge of another script, seed or split\n", longrun.PlanPath(l.dir))
		}
	}
	return nil
}

// runLong runs a point's engine spec with the long-run settings: from its saved state, saving
// as it commits, as a shard, or replayed.
func (x *Experiment) runLong(pt Point, spec engine.Spec, run runner) (engine.Outcome, error) {
	l, err := x.longFor(spec.Seed)
	if err != nil {
		return engine.Outcome{}, err
	}
	if l == nil {
		return run(spec)
	}
	switch l.mode {
	case replaying:
		return l.replay(pt, spec, run)
	case sharding:
		return l.shard(pt, spec, run)
	}
	return l.checkpoint(pt, spec, run)
}

// runner runs an engine spec (engine.Run, with the progress line).
type runner func(engine.Spec) (engine.Outcome, error)

func (l *longRun) checkpoint(pt Point, spec engine.Spec, run runner) (engine.Outcome, error) {
	cur := longrun.PointState{Index: pt.Index, Values: pt.Values}
	var counts []link.Tally
	var before time.Duration
	if l.old != nil {
		if ps := l.old.Point(pt.Index); ps != nil {
			if !slices.Equal(ps.Values, pt.Values) {
				return engine.Outcome{}, fmt.Errorf("resume: point %d of %s has values %v, the sweep %v; run with -restart", pt.Index+1, l.path, ps.Values, pt.Values)
			}
			before = time.Duration(ps.Seconds * float64(time.Second))
			counts = ps.Tallies()
			spec.Start = &engine.State{Frames: ps.Frames, Counts: append([]link.Tally(nil), counts...), Elapsed: before}
			cur.Frames = ps.Frames
		}
	}
	start := time.Now()
	spec.OnTaps = chainTaps(spec.OnTaps, func(taps []string) {
		cur.Taps = taps
		if counts == nil {
			counts = make([]link.Tally, len(taps))
		}
	})
	spec.OnCommit = chainCommit(spec.OnCommit, func(f int64, c []link.Tally) {
		for i := range c {
			counts[i].Add(c[i])
		}
		cur.Frames++
		if l.due() {
			cur.SetTallies(counts)
			cur.Seconds = (before + time.Since(start)).Seconds()
			l.ck.Set(cur)
			l.save(longrun.KindCheckpoint, l.ck)
		}
	})
	out, err := run(spec)
	if err != nil {
		return out, err
	}
	cur.Frames, cur.Seconds = out.Frames, out.Elapsed.Seconds()
	cur.SetTallies(out.Counts)
	if out.Stop != engine.Interrupted {
		cur.Stop = out.Stop
	}
	l.ck.Set(cur)
	l.save(longrun.KindCheckpoint, l.ck)
	return out, nil
}

func (l *longRun) shard(pt Point, spec engine.Spec, run runner) (engine.Outcome, error) {
	part := *l.set.Shard
	sp := l.sh.Point(pt.Index)
	if sp == nil {
		l.sh.Points = append(l.sh.Points, longrun.ShardPoint{Index: pt.Index, Values: pt.Values})
		slices.SortFunc(l.sh.Points, func(a, b longrun.ShardPoint) int { return a.Index - b.Index })
		sp = l.sh.Point(pt.Index)
	}
	if !slices.Equal(sp.Values, pt.Values) {
		return engine.Outcome{}, fmt.Errorf("shard: point %d of %s has values %v, the sweep %v; run with -restart", pt.Index+1, l.path, sp.Values, pt.Values)
	}
	before := time.Duration(sp.Seconds * float64(time.Second))
	if sp.Frames > 0 {
		spec.Start = &engine.State{Frames: sp.Frames, Counts: sp.Sum(), Elapsed: before}
	}
	var need int64
	if l.plan != nil {
		need = longrun.MinFrames(l.plan.Target(pt.Index), part)
	}
	spec.Shard = &engine.Shard{Index: part.Index, Of: part.Of, Min: need}
	start := time.Now()
	spec.OnTaps = chainTaps(spec.OnTaps, func(taps []string) { sp.Taps = taps })
	spec.OnCommit = chainCommit(spec.OnCommit, func(f int64, c []link.Tally) {
		sp.Add(c)
		if l.due() {
			sp.Seconds = (before + time.Since(start)).Seconds()
			l.save(longrun.KindShard, l.sh)
		}
	})
	out, err := run(spec)
	if err != nil {
		return out, err
	}
	if out.Frames != sp.Frames {
		return out, fmt.Errorf("shard: point %d: %d frames committed, %d saved", pt.Index+1, out.Frames, sp.Frames)
	}
	sp.Done, sp.Stop, sp.Seconds = out.Stop != engine.Interrupted, out.Stop, out.Elapsed.Seconds()
	l.save(longrun.KindShard, l.sh)
	return out, nil
}

func (l *longRun) replay(pt Point, spec engine.Spec, run runner) (engine.Outcome, error) {
	m := l.set.Replay
	if v := m.Values(pt.Index); v != nil && !slices.Equal(v, pt.Values) {
		return engine.Outcome{}, fmt.Errorf("merge: the shards' point %d has values %v, the sweep %v", pt.Index+1, v, pt.Values)
	}
	spec.Replay = func(f int64) ([]link.Tally, bool) { return m.Frame(pt.Index, f) }
	spec.Workers = 1
	out, err := run(spec)
	if err != nil {
		return out, err
	}
	out.Elapsed = time.Duration(m.Seconds(pt.Index) * float64(time.Second))
	if out.Stop == engine.Short {
		need, _ := engine.Extrapolate(spec.Rules, &stop.Progress{Frames: out.Frames, Taps: out.Taps, Counts: out.Counts})
		var lab []string
		for _, n := range pt.Names {
			lab = append(lab, n+"="+pt.Label(n))
		}
		l.short = append(l.short, longrun.ShortPoint{Index: pt.Index, Label: strings.Join(lab, " "), Covered: out.Frames, Need: need})
	}
	return out, nil
}

// due says whether a periodic save is due.
func (l *longRun) due() bool { return l.every > 0 && time.Now().After(l.next) }

// save writes the checkpoint or shard file. A failed periodic save is reported once and the
// run goes on; the save at the end (finishLong) fails the run.
func (l *longRun) save(kind string, v any) error {
	t := time.Now()
	err := longrun.Save(l.path, kind, v)
	// A slow disk must not slow the run: save at most a tenth of the time.
	l.next = time.Now().Add(max(l.every, 10*time.Since(t)))
	if err != nil && !l.warn {
		l.warn = true
		l.x.opts.logf("warning: cannot save %s: %v\n", l.path, err)
	}
	return err
}

// finishLong ends the long run before the outputs are written. A shard run saves its shard
// file instead of them (skip); a merge whose shards fell short fails with what is missing.
func (x *Experiment) finishLong(r *result.Run) (skip bool, err error) {
	l := x.opts.long
	if l == nil || l.x != x {
		return false, nil
	}
	switch l.mode {
	case replaying:
		if len(l.short) > 0 {
			l.set.Short = &longrun.ShortError{Of: l.set.Replay.Of, Points: l.short}
			return true, l.set.Short
		}
	case sharding:
		if err := l.save(longrun.KindShard, l.sh); err != nil {
			return true, err
		}
		x.opts.logf("shard %s written to %s; once all %d have run: tally merge %s\n", l.set.Shard, l.path, l.set.Shard.Of, longrun.ShardDir(l.dir))
		return true, nil
	}
	return false, nil
}

// writtenLong follows a successful write of the outputs: a complete run's checkpoint is done
// with.
func (x *Experiment) writtenLong(r *result.Run) error {
	l := x.opts.long
	if l == nil || l.x != x || l.mode != checkpointing || r.Interrupted {
		return nil
	}
	if err := os.Remove(l.path); err != nil && !errors.Is(err, os.ErrNotExist) {
		return err
	}
	return nil
}

func chainCommit(a, b func(int64, []link.Tally)) func(int64, []link.Tally) {
	if a == nil {
		return b
	}
	return func(f int64, c []link.Tally) { a(f, c); b(f, c) }
}

func chainTaps(a, b func([]string)) func([]string) {
	if a == nil {
		return b
	}
	return func(t []string) { a(t); b(t) }
}
