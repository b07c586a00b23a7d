package longrun

import (
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"time"

	"tally/blocks/link"
	"tally/runtime/engine"
)

// KindProgress is the kind of a shard's progress file.
const KindProgress = "progress"

// ShareEvery is how often, at most, a shard tells its progress to the shards beside it and
// reads theirs (the -checkpoint interval when that is shorter).
const ShareEvery = time.Second

// ShardProgress is what a shard tells the shards that share its folder: per point, its counts
// after some of its own frames (engine.Seen). It is small — at most engine.MaxSteps steps a
// point — and replaced atomically as the shard goes. The counts of a frame depend only on the
// seed, the point and the frame, so a progress file of the same script, seed and split is true
// whenever it was written: a stale one tells less, never something false.
type ShardProgress struct {
	SHA256 string          `json:"script_sha256"`
	Seed   uint64          `json:"seed"`
	Index  int             `json:"shard"`
	Of     int             `json:"shards"`
	Points []ProgressPoint `json:"points"`
}

// ProgressPoint is one point's steps: after Frames[k] of the shard's own frames, its counts
// per tap were Counts[k] (trials, errors, frames, Σ errors², as a checkpoint packs them).
type ProgressPoint struct {
	Index  int          `json:"point"`
	Values []float64    `json:"values"`
	Taps   []string     `json:"taps"`
	Frames []int64      `json:"frames"`
	Counts [][][4]int64 `json:"counts"`
}

// ProgressPath is the progress file of shard p in the shard folder of outputs dir.
func ProgressPath(dir string, p Part) string {
	return filepath.Join(ShardDir(dir), fmt.Sprintf("progress-%d-of-%d.tally", p.Index, p.Of))
}

// progressPoint packs a point's own steps.
func progressPoint(pt Point, taps []string, s *engine.Seen) ProgressPoint {
	p := ProgressPoint{Index: pt.Index, Values: pt.Values, Taps: taps}
	for _, st := range s.Steps {
		p.Frames = append(p.Frames, st.Frames)
		p.Counts = append(p.Counts, Pack(st.Counts))
	}
	return p
}

// seen unpacks a point's steps as told by shard index, or false when they do not fit the
// point's values and taps.
func (p *ProgressPoint) seen(index int, values []float64, taps []string) (engine.Seen, bool) {
	s := engine.Seen{Index: index}
	if !slices.Equal(p.Values, values) || !slices.Equal(p.Taps, taps) || len(p.Frames) != len(p.Counts) {
		return s, false
	}
	for k, f := range p.Frames {
		if len(p.Counts[k]) != len(taps) || k > 0 && f <= p.Frames[k-1] {
			return engine.Seen{Index: index}, false
		}
		s.Steps = append(s.Steps, engine.Step{Frames: f, Counts: Unpack(p.Counts[k])})
	}
	return s, true
}

// sharing is a shard's side of the progress exchange: its own steps of every point it ran in
// this process, told in its progress file, and the other shards' files read back.
type sharing struct {
	s      *Session
	own    map[int]*ProgressPoint // by point index
	steps  map[int]*engine.Seen
	recent []int // the points told last, the latest last
	files  map[int]readFile
	next   time.Time
	warn   bool
}

// Recent is how many of the points a shard told last keep all their steps in its progress
// file; older ones keep their last step only, so the file stays small over a long sweep.
const Recent = 4

// readFile is another shard's progress file as last read, with the size and time it had then.
type readFile struct {
	size int64
	mod  time.Time
	f    *ShardProgress
}

// newSharing starts the exchange of a shard's session; what an earlier run of the same shard
// told is kept until its points are run again.
func newSharing(s *Session) *sharing {
	h := &sharing{s: s, own: map[int]*ProgressPoint{}, steps: map[int]*engine.Seen{}, files: map[int]readFile{}}
	if f, ok := h.load(*s.set.Shard); ok {
		for k := range f.Points {
			h.own[f.Points[k].Index] = &f.Points[k]
		}
	}
	return h
}

// load reads shard part's progress file, if it is of this script, seed and split. A file
// unchanged since the last read (same size and time) is not read again.
func (h *sharing) load(part Part) (*ShardProgress, bool) {
	path := ProgressPath(h.s.job.Dir, part)
	st, err := os.Stat(path)
	if err != nil {
		return nil, false
	}
	if r, ok := h.files[part.Index]; ok && r.size == st.Size() && r.mod.Equal(st.ModTime()) {
		return r.f, r.f != nil
	}
	var f ShardProgress
	ok := Load(path, KindProgress, &f) == nil &&
		f.SHA256 == h.s.job.SHA256 && f.Seed == h.s.job.Seed && f.Index == part.Index && f.Of == part.Of
	r := readFile{size: st.Size(), mod: st.ModTime()}
	if ok {
		r.f = &f
	}
	h.files[part.Index] = r
	return r.f, ok
}

// interval is how often the shard tells and reads.
func (h *sharing) interval() time.Duration {
	if e := h.s.every; e > 0 && e < ShareEvery {
		return e
	}
	return ShareEvery
}

// due says whether a tell is due.
func (h *sharing) due() bool { return time.Now().After(h.next) }

// tell records the point's counts after its first frames own frames, writes the progress
// file, and returns what the other shards have told of the point, for engine.Shard.Seen.
func (h *sharing) tell(pt Point, taps []string, frames int64, counts []link.Tally) []engine.Seen {
	st := h.steps[pt.Index]
	if st == nil {
		st = &engine.Seen{Index: h.s.set.Shard.Index}
		h.steps[pt.Index] = st
	}
	st.Record(frames, counts)
	pp := progressPoint(pt, taps, st)
	h.own[pt.Index] = &pp
	h.recent = append(slices.DeleteFunc(h.recent, func(i int) bool { return i == pt.Index }), pt.Index)
	if len(h.recent) > Recent {
		if old := h.own[h.recent[0]]; old != nil && len(old.Frames) > 1 {
			n := len(old.Frames)
			old.Frames, old.Counts = old.Frames[n-1:], old.Counts[n-1:]
		}
		h.recent = h.recent[1:]
	}
	part := *h.s.set.Shard
	f := &ShardProgress{SHA256: h.s.job.SHA256, Seed: h.s.job.Seed, Index: part.Index, Of: part.Of}
	for _, p := range h.own {
		f.Points = append(f.Points, *p)
	}
	slices.SortFunc(f.Points, func(a, b ProgressPoint) int { return a.Index - b.Index })
	if err := Save(ProgressPath(h.s.job.Dir, part), KindProgress, f); err != nil && !h.warn {
		// The shards then cannot see this one: they run further, as apart, and the table
		// is the same.
		h.warn = true
		h.s.job.Logf("warning: cannot write %s (the other shards will not see this one's progress): %v\n", ProgressPath(h.s.job.Dir, part), err)
	}
	seen := h.read(pt, taps)
	h.next = time.Now().Add(h.interval())
	return seen
}

// read is what the other shards of this split have told of the point: their progress files
// of the same script and seed. A missing, damaged or foreign file tells nothing.
func (h *sharing) read(pt Point, taps []string) []engine.Seen {
	part := *h.s.set.Shard
	var out []engine.Seen
	for j := 0; j < part.Of; j++ {
		if j == part.Index {
			continue
		}
		f, ok := h.load(Part{Index: j, Of: part.Of})
		if !ok {
			continue
		}
		for k := range f.Points {
			if f.Points[k].Index == pt.Index {
				if s, ok := f.Points[k].seen(j, pt.Values, taps); ok && len(s.Steps) > 0 {
					out = append(out, s)
				}
			}
		}
	}
	return out
}
