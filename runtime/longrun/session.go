package longrun

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"time"

	"tally/blocks/link"
	"tally/blocks/stop"
	"tally/runtime/engine"
	"tally/runtime/framelog"
	"tally/runtime/result"
)

// A Session is the long-run side of one run: it keeps a checkpoint of the committed counts in
// the outputs folder (resume), or computes one shard of every point's frames and keeps a shard
// file instead of the outputs, or replays merged shard files instead of computing. The
// engine's committed prefix is the only state in each case, so a resumed, a merged and an
// uninterrupted run give the same table. The executor asks it to run each point (Run), before
// the outputs are written (Finish) and after (Written); the engine tells it each commit as
// an engine.Observer.
//
// A wall-time stop rule cannot be replayed: a resumed point keeps the wall time it had spent,
// but where it then stops depends on the machine; a merge sees no wall time at all.
type Session struct {
	job   Job
	set   *Settings
	mode  int
	path  string // checkpoint or shard file
	every time.Duration
	next  time.Time // when the next periodic save is due
	warn  bool      // a failed save was reported

	ck    *Checkpoint // checkpointing: what is saved
	old   *Checkpoint // the checkpoint resumed from
	sh    *ShardFile  // sharding: what is saved
	plan  *Plan       // the plan a short merge left, for -extend
	share *sharing    // sharding: the progress told to and read from the other shards
	short []ShortPoint
	used  int64 // a merge: the bits of the BER tap its points counted
}

const (
	checkpointing = iota
	sharding
	replaying
)

// Job is the run a session belongs to.
type Job struct {
	Name   string // the experiment's name
	Script string // the script's path
	SHA256 string // hex SHA-256 of the script's bytes
	Seed   uint64
	Dir    string                        // the outputs folder
	Logf   func(format string, a ...any) // notes for the user (resumed from, replaced, written)
}

// Point is a sweep point as a session needs it.
type Point struct {
	Index  int
	Values []float64
	Label  string // its parameters as the table shows them, for a merge that falls short
	// Fingerprint is the point's link fingerprint (see result.Point): saved with its frames,
	// so that frames computed under another fingerprint (another tally build) are never kept
	// as this point's frame by frame.
	Fingerprint string
}

// Open starts the session of a run with settings set: it checks a checkpoint or shard file it
// continues, or a merge's shards, against the script, seed and experiment. No settings: nil,
// and a nil Session runs points plainly.
func Open(set *Settings, j Job) (*Session, error) {
	if set == nil {
		return nil, nil
	}
	if j.Logf == nil {
		j.Logf = func(string, ...any) {}
	}
	s := &Session{job: j, set: set, every: set.Interval()}
	var err error
	switch {
	case set.Replay != nil:
		s.mode = replaying
		m := set.Replay
		switch {
		case m.SHA256 != j.SHA256:
			err = fmt.Errorf("merge: the shards were made by another version of %s (SHA-256 %.12s…, the script now %.12s…)", j.Script, m.SHA256, j.SHA256)
		case m.Seed != j.Seed:
			err = fmt.Errorf("merge: the shards have seed %d, the run seed %d", m.Seed, j.Seed)
		case m.Name != j.Name:
			err = fmt.Errorf("merge: the shards are of experiment %q, the script runs %q", m.Name, j.Name)
		}
	case set.Shard != nil:
		s.mode = sharding
		if err = s.openShard(); err == nil {
			s.share = newSharing(s)
		}
	default:
		s.mode = checkpointing
		err = s.openCheckpoint()
	}
	if err != nil {
		return nil, err
	}
	s.next = time.Now().Add(s.every)
	return s, nil
}

func (s *Session) openCheckpoint() error {
	j := s.job
	s.path = CheckpointPath(j.Dir)
	s.ck = &Checkpoint{Name: j.Name, Script: j.Script, SHA256: j.SHA256, Seed: j.Seed}
	if s.set.Restart {
		if err := os.Remove(s.path); err != nil && !errors.Is(err, os.ErrNotExist) {
			return err
		}
		return nil
	}
	old, err := LoadCheckpoint(s.path)
	switch {
	case errors.Is(err, os.ErrNotExist):
		if s.set.Resume {
			j.Logf("resume: no checkpoint in %s; starting afresh\n", j.Dir)
		}
		return nil
	case !s.set.Resume:
		j.Logf("note: replacing the checkpoint of an earlier unfinished run (-resume would continue it)\n")
		return nil
	case err != nil:
		return fmt.Errorf("resume: %w; run with -restart to start afresh", err)
	}
	if err := s.match("resume: the checkpoint "+s.path, old.Name, old.SHA256, old.Seed); err != nil {
		return err
	}
	s.old = old
	// Until a point is run again, the checkpoint keeps what the old one had of it.
	s.ck.Points = append([]PointState(nil), old.Points...)
	done, at := 0, ""
	for _, p := range old.Points {
		if p.Stop != "" {
			done++
		} else {
			at = fmt.Sprintf(", point %d from frame %d", p.Index, p.Frames)
		}
	}
	if !s.set.HandedOver {
		j.Logf("resume: %d finished point(s)%s, from %s\n", done, at, s.path)
	}
	return nil
}

// match refuses saved work of another experiment, script version or seed.
func (s *Session) match(what, name, savedHash string, savedSeed uint64) error {
	j := s.job
	switch {
	case name != j.Name:
		return fmt.Errorf("%s is of experiment %q, the script runs %q; run with -restart to start afresh", what, name, j.Name)
	case savedHash != j.SHA256:
		return fmt.Errorf("%s was made by another version of the script (SHA-256 %.12s…, the script now %.12s…); run with -restart to start afresh", what, savedHash, j.SHA256)
	case savedSeed != j.Seed:
		return fmt.Errorf("%s was made with seed %d, this run has seed %d; give -seed %d to continue it, or -restart to start afresh", what, savedSeed, j.Seed, savedSeed)
	}
	return nil
}

func (s *Session) openShard() error {
	j := s.job
	part := *s.set.Shard
	s.path = ShardPath(j.Dir, part)
	s.sh = &ShardFile{Name: j.Name, Script: j.Script, SHA256: j.SHA256, Seed: j.Seed, Index: part.Index, Of: part.Of, Host: host()}
	if s.set.Restart {
		if err := os.Remove(s.path); err != nil && !errors.Is(err, os.ErrNotExist) {
			return err
		}
		return nil
	}
	old, err := LoadShard(s.path)
	cont := s.set.Extend || s.set.Resume
	switch {
	case errors.Is(err, os.ErrNotExist):
		if cont {
			j.Logf("shard %s: no shard file %s yet; starting afresh\n", part, s.path)
		}
		return nil
	case !cont:
		j.Logf("note: replacing the shard file %s (-extend would continue it)\n", s.path)
		return nil
	case err != nil:
		return fmt.Errorf("shard: %w; run with -restart to start afresh", err)
	}
	if err := s.match("shard: "+s.path, old.Name, old.SHA256, old.Seed); err != nil {
		return err
	}
	if old.Index != part.Index || old.Of != part.Of {
		return fmt.Errorf("shard: %s holds shard %d/%d, not %s", s.path, old.Index, old.Of, part)
	}
	s.sh = old
	s.sh.Host = host()
	if s.set.Extend {
		plan, err := LoadPlan(PlanPath(j.Dir))
		switch {
		case errors.Is(err, os.ErrNotExist):
		case err != nil:
			return fmt.Errorf("extend: %w", err)
		case plan.SHA256 == j.SHA256 && plan.Seed == j.Seed && plan.Of == part.Of:
			s.plan = plan
		default:
			j.Logf("extend: ignoring %s, left by a merge of another script, seed or split\n", PlanPath(j.Dir))
		}
	}
	return nil
}

// Runner runs an engine spec (engine.Run, with whatever the executor adds).
type Runner func(engine.Spec) (engine.Outcome, error)

// Run runs a point's engine spec with the session's settings: from its saved state, saving
// as it commits, as a shard, or replayed. A nil session runs the spec as it is.
func (s *Session) Run(pt Point, spec engine.Spec, run Runner) (engine.Outcome, error) {
	if s == nil {
		return run(spec)
	}
	switch s.mode {
	case replaying:
		return s.replay(pt, spec, run)
	case sharding:
		return s.shard(pt, spec, run)
	}
	return s.checkpoint(pt, spec, run)
}

// checkpointer saves a point's committed prefix in the checkpoint as the engine commits.
type checkpointer struct {
	engine.Ignore
	s      *Session
	cur    PointState
	counts []link.Tally
	log    *framelog.Log // the prefix frame by frame (nil: a resumed prefix without one)
	before time.Duration
	start  time.Time
}

func (c *checkpointer) Started(taps []string) {
	c.cur.Taps = taps
	if c.counts == nil {
		c.counts = make([]link.Tally, len(taps))
		c.log = framelog.New(len(taps))
	}
}

func (c *checkpointer) Committed(f int64, counts []link.Tally) {
	for i := range counts {
		c.counts[i].Add(counts[i])
	}
	c.cur.Frames++
	if c.log != nil {
		c.log.Add(counts)
	}
	if c.s.due() {
		c.cur.Log = c.log
		c.cur.SetTallies(c.counts)
		c.cur.Seconds = (c.before + time.Since(c.start)).Seconds()
		c.s.ck.Set(c.cur)
		c.s.save(KindCheckpoint, c.s.ck)
	}
}

func (s *Session) checkpoint(pt Point, spec engine.Spec, run Runner) (engine.Outcome, error) {
	c := &checkpointer{s: s, cur: PointState{Index: pt.Index, Values: pt.Values, Fingerprint: pt.Fingerprint}}
	if s.old != nil {
		if ps := s.old.Point(pt.Index); ps != nil {
			if !slices.Equal(ps.Values, pt.Values) {
				return engine.Outcome{}, fmt.Errorf("resume: point %d of %s has values %v, the sweep %v; run with -restart", pt.Index, s.path, ps.Values, pt.Values)
			}
			c.before = time.Duration(ps.Seconds * float64(time.Second))
			c.counts = ps.Tallies()
			// The frame by frame counts go on only when they were computed under this
			// fingerprint: the run's counts are the same either way (the script and seed
			// are), but a later run may replay or pair what the log says.
			var log *framelog.Log
			if ps.Log != nil && ps.Log.Frames == ps.Frames && ps.Fingerprint == pt.Fingerprint {
				log = ps.Log
			} else {
				c.cur.Fingerprint = ""
			}
			c.log = log.Clone()
			spec.Start = &engine.State{Frames: ps.Frames, Counts: append([]link.Tally(nil), c.counts...), Elapsed: c.before, Log: log.Clone()}
			c.cur.Frames = ps.Frames
		}
	}
	c.start = time.Now()
	spec.Observers = append(slices.Clip(spec.Observers), c)
	out, err := run(spec)
	if err != nil {
		return out, err
	}
	cur := c.cur
	cur.Frames, cur.Seconds = out.Frames, out.Elapsed.Seconds()
	cur.SetTallies(out.Counts)
	cur.Log = out.Log
	if out.Stop != engine.Interrupted {
		cur.Stop = out.Stop
	}
	s.ck.Set(cur)
	s.save(KindCheckpoint, s.ck)
	return out, nil
}

// sharder keeps a shard's committed frames in the shard file as the engine commits, and
// tells its counts to the shards beside it and reads theirs into the shard's estimate
// (engine.Shard.Seen), at most every sharing interval.
type sharder struct {
	engine.Ignore
	s      *Session
	pt     Point
	sp     *ShardPoint
	shard  *engine.Shard
	sum    []link.Tally // the point's counts in this shard so far
	before time.Duration
	start  time.Time
}

func (h *sharder) Started(taps []string) {
	h.sp.Taps = taps
	h.sum = h.sp.Sum()
	h.tell()
}

func (h *sharder) Committed(f int64, c []link.Tally) {
	h.sp.Add(c)
	for i := range c {
		h.sum[i].Add(c[i])
	}
	if h.s.due() {
		h.sp.Seconds = (h.before + time.Since(h.start)).Seconds()
		h.s.save(KindShard, h.s.sh)
	}
	if h.s.share.due() {
		h.tell()
	}
}

// tell tells this shard's counts of the point and takes in what the others told.
func (h *sharder) tell() {
	h.shard.Seen = h.s.share.tell(h.pt, h.sp.Taps, h.sp.Frames, h.sum)
}

func (s *Session) shard(pt Point, spec engine.Spec, run Runner) (engine.Outcome, error) {
	part := *s.set.Shard
	sp := s.sh.Point(pt.Index)
	if sp == nil {
		s.sh.Points = append(s.sh.Points, ShardPoint{Index: pt.Index, Values: pt.Values, Fingerprint: pt.Fingerprint})
		slices.SortFunc(s.sh.Points, func(a, b ShardPoint) int { return a.Index - b.Index })
		sp = s.sh.Point(pt.Index)
	}
	if !slices.Equal(sp.Values, pt.Values) {
		return engine.Outcome{}, fmt.Errorf("shard: point %d of %s has values %v, the sweep %v; run with -restart", pt.Index, s.path, sp.Values, pt.Values)
	}
	before := time.Duration(sp.Seconds * float64(time.Second))
	if sp.Frames == 0 {
		sp.Fingerprint = pt.Fingerprint
	} else if sp.Fingerprint != pt.Fingerprint {
		sp.Fingerprint = "" // frames of two builds
	}
	if sp.Frames > 0 {
		spec.Start = &engine.State{Frames: sp.Frames, Counts: sp.Sum(), Elapsed: before}
	}
	var need int64
	if s.plan != nil {
		need = MinFrames(s.plan.Target(pt.Index), part)
	}
	spec.Shard = &engine.Shard{Index: part.Index, Of: part.Of, Min: need}
	h := &sharder{s: s, pt: pt, sp: sp, shard: spec.Shard, before: before, start: time.Now()}
	spec.Observers = append(slices.Clip(spec.Observers), h)
	out, err := run(spec)
	if err != nil {
		return out, err
	}
	if out.Frames != sp.Frames {
		return out, fmt.Errorf("shard: point %d: %d frames committed, %d saved", pt.Index, out.Frames, sp.Frames)
	}
	sp.Done, sp.Stop, sp.Seconds = out.Stop != engine.Interrupted, out.Stop, out.Elapsed.Seconds()
	s.save(KindShard, s.sh)
	h.tell() // the point's last counts, for the shards still on it
	// The rule was met on an estimate, not on these counts (every Of-th frame, possibly past
	// the error target): no interval of that rule holds on them, so none is claimed. A
	// shard's outputs are its shard file; the merge judges the rules on the real prefix.
	out.Rule = nil
	return out, nil
}

func (s *Session) replay(pt Point, spec engine.Spec, run Runner) (engine.Outcome, error) {
	m := s.set.Replay
	if v := m.Values(pt.Index); v != nil && !slices.Equal(v, pt.Values) {
		return engine.Outcome{}, fmt.Errorf("merge: the shards' point %d has values %v, the sweep %v", pt.Index, v, pt.Values)
	}
	spec.Replay = func(f int64) ([]link.Tally, bool) { return m.Frame(pt.Index, f) }
	spec.Workers = 1
	out, err := run(spec)
	if err != nil {
		return out, err
	}
	out.Elapsed = time.Duration(m.Seconds(pt.Index) * float64(time.Second))
	if i := slices.Index(out.Taps, link.TapBER); i >= 0 {
		s.used += out.Counts[i].Trials
	}
	if !m.Fingerprinted(pt.Index, pt.Fingerprint) {
		out.Log = nil
	}
	if out.Stop == engine.Short {
		need, _ := engine.Extrapolate(spec.Rules, &stop.Progress{Frames: out.Frames, Taps: out.Taps, Counts: out.Counts})
		s.short = append(s.short, ShortPoint{Index: pt.Index, Label: pt.Label, Covered: out.Frames, Need: need})
	}
	return out, nil
}

// due says whether a periodic save is due.
func (s *Session) due() bool { return s.every > 0 && time.Now().After(s.next) }

// save writes the checkpoint or shard file. A failed periodic save is reported once and the
// run goes on; the save at the end (Finish) fails the run.
func (s *Session) save(kind string, v any) error {
	t := time.Now()
	err := Save(s.path, kind, v)
	// A slow disk must not slow the run: save at most a tenth of the time.
	s.next = time.Now().Add(max(s.every, 10*time.Since(t)))
	if err != nil && !s.warn {
		s.warn = true
		s.job.Logf("warning: cannot save %s: %v\n", s.path, err)
	}
	return err
}

// Finish ends the session before the outputs are written. A shard run saves its shard file
// instead of them (skip); a merge whose shards fell short fails with what is missing (and
// leaves it in Settings.Short).
func (s *Session) Finish() (skip bool, err error) {
	if s == nil {
		return false, nil
	}
	switch s.mode {
	case replaying:
		if len(s.short) > 0 {
			s.set.Short = &ShortError{Of: s.set.Replay.Of, Points: s.short}
			return true, s.set.Short
		}
	case sharding:
		if err := s.save(KindShard, s.sh); err != nil {
			return true, err
		}
		s.job.Logf("shard %s written to %s; once all %d have run: tally merge %s\n", s.set.Shard, s.path, s.set.Shard.Of, ShardDir(s.job.Dir))
		return true, nil
	}
	return false, nil
}

// Written follows a successful write of the outputs: a complete run's checkpoint is done
// with.
func (s *Session) Written(interrupted bool) error {
	if s == nil || s.mode != checkpointing || interrupted {
		return nil
	}
	if err := os.Remove(s.path); err != nil && !errors.Is(err, os.ErrNotExist) {
		return err
	}
	return nil
}

// host is this machine's name, or "" when it has none.
func host() string {
	h, _ := os.Hostname()
	return h
}

// Record is a merge's record of its shards (nil for other runs): the files with their hashes
// and hosts, the bits each computed, and the overshoot over the bits the merged table counts.
// It is also left in Settings.Record.
func (s *Session) Record() *result.Shards {
	if s == nil || s.mode != replaying {
		return nil
	}
	m := s.set.Replay
	r := &result.Shards{Count: m.Of, Used: s.used}
	for i, f := range m.shards {
		sf := result.ShardFile{Shard: i, File: filepath.Base(m.Paths[i]), Host: f.Host}
		if i < len(m.Hashes) {
			sf.SHA256 = m.Hashes[i]
		}
		for k := range f.Points {
			p := &f.Points[k]
			if j := slices.Index(p.Taps, link.TapBER); j >= 0 {
				sf.Bits += p.Sum()[j].Trials
			}
		}
		r.Bits += sf.Bits
		r.Files = append(r.Files, sf)
	}
	if r.Used > 0 {
		r.Overshoot = float64(r.Bits-r.Used) / float64(r.Used)
	}
	s.set.Record = r
	return r
}
