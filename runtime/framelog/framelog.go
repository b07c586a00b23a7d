// Package framelog keeps a point's committed per-frame counts: the sequence the engine
// commits, which is the source of truth of a run (a checkpoint or a merge replays it). Kept
// with the run's outputs, it lets a later run of the same point reuse the frames instead of
// computing them again, and lets two runs of one point be compared frame by frame (they draw
// the same random numbers for the same frame).
//
// A log is run-length coded: consecutive frames with the same counts in every tap are kept
// once with their number. At a low error rate most frames count no error, so a log grows with
// the frames that have errors (which the stop rules bound), not with the bits.
package framelog

import (
	"bufio"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"sort"

	"tally/blocks/link"
)

// Log is one point's per-frame counts in frame order. Runs holds, per run of equal frames,
// the run's length and then each tap's trials and errors: [n, trials₀, errors₀, trials₁, …].
// Only plain counts are kept: a frame counted with weights (an estimator) stops the log
// (Dropped), since its weighted sums are not in it; so does a log that would grow past
// MaxValues (a long point at a high error rate, where nearly every frame differs), so that
// memory stays bounded however many bits a point counts.
type Log struct {
	Taps    int     `json:"taps"`
	Frames  int64   `json:"frames"`
	Runs    []int64 `json:"runs"`
	Dropped bool    `json:"dropped,omitempty"`

	starts []int64 // frame where each run begins (index); built on the first look-up
}

// MaxValues bounds a log: 2²¹ values, 16 MiB.
const MaxValues = 1 << 21

// New is an empty log of frames counted by taps taps.
func New(taps int) *Log { return &Log{Taps: taps} }

func (l *Log) stride() int { return 1 + 2*l.Taps }

// Usable reports whether the log holds every frame it was given.
func (l *Log) Usable() bool { return l != nil && !l.Dropped }

// Add appends one frame's counts (one Tally per tap, as the engine commits them).
func (l *Log) Add(c []link.Tally) { l.AddN(c, 1) }

// AddN appends n frames with the same counts c (n ≥ 1): one run of the log, however long.
func (l *Log) AddN(c []link.Tally, n int64) {
	if l.Dropped || n < 1 {
		return
	}
	if len(c) != l.Taps {
		l.drop()
		return
	}
	for _, t := range c {
		if t.Estimator != link.Count {
			l.drop()
			return
		}
	}
	l.Frames += n
	l.starts = nil
	s := l.stride()
	if k := len(l.Runs) - s; k >= 0 {
		same := true
		for i, t := range c {
			if l.Runs[k+1+2*i] != t.Trials || l.Runs[k+2+2*i] != t.Errors {
				same = false
				break
			}
		}
		if same {
			l.Runs[k] += n
			return
		}
	}
	if len(l.Runs)+s > MaxValues {
		l.drop()
		return
	}
	l.Runs = append(l.Runs, n)
	for _, t := range c {
		l.Runs = append(l.Runs, t.Trials, t.Errors)
	}
}

func (l *Log) drop() { l.Dropped, l.Runs, l.starts = true, nil, nil }

// Clone is an independent copy of the log.
func (l *Log) Clone() *Log {
	if l == nil {
		return nil
	}
	return &Log{Taps: l.Taps, Frames: l.Frames, Runs: append([]int64(nil), l.Runs...), Dropped: l.Dropped}
}

func (l *Log) index() {
	s := l.stride()
	l.starts = make([]int64, 0, len(l.Runs)/s)
	var n int64
	for k := 0; k+s <= len(l.Runs); k += s {
		l.starts = append(l.starts, n)
		n += l.Runs[k]
	}
}

// Frame is frame k's counts (a Tally per tap, Frames and Squares zero as the engine gives a
// frame's own counts); false past the end of the log.
func (l *Log) Frame(k int64) ([]link.Tally, bool) {
	if !l.Usable() || k < 0 || k >= l.Frames {
		return nil, false
	}
	if l.starts == nil {
		l.index()
	}
	j := sort.Search(len(l.starts), func(j int) bool { return l.starts[j] > k }) - 1
	r := l.Runs[j*l.stride():]
	c := make([]link.Tally, l.Taps)
	for i := range c {
		c[i] = link.Tally{Trials: r[1+2*i], Errors: r[2+2*i]}
	}
	return c, true
}

// Each calls fn for each run of equal frames among the first n frames, in order: the frame the
// run starts at, how many of its frames lie within n, and the counts of each (tap i's trials
// and errors at 2i, 2i+1 of counts).
func (l *Log) Each(n int64, fn func(first, count int64, counts []int64)) {
	if !l.Usable() {
		return
	}
	s := l.stride()
	var at int64
	for k := 0; k+s <= len(l.Runs) && at < n; k += s {
		m := min(l.Runs[k], n-at)
		fn(at, m, l.Runs[k+1:k+s])
		at += l.Runs[k]
	}
}

// Sum is the total of the first n frames, as the engine sums them (Frames and Squares too).
func (l *Log) Sum(n int64) []link.Tally {
	t := make([]link.Tally, l.Taps)
	l.Each(n, func(_, m int64, c []int64) {
		for i := range t {
			e := c[2*i+1]
			t[i].Trials += m * c[2*i]
			t[i].Errors += m * e
			t[i].Frames += m
			t[i].Squares += m * e * e
		}
	})
	return t
}

// Check reports a log whose runs do not add up to its frames or do not fit its taps.
func (l *Log) Check() error {
	if l.Dropped {
		return nil
	}
	s := l.stride()
	if l.Taps < 0 || len(l.Runs)%s != 0 {
		return errors.New("frame log: its runs do not fit its taps")
	}
	var n int64
	for k := 0; k < len(l.Runs); k += s {
		if l.Runs[k] < 1 {
			return errors.New("frame log: a run of no frames")
		}
		for _, v := range l.Runs[k+1 : k+s] {
			if v < 0 {
				return errors.New("frame log: a negative count")
			}
		}
		n += l.Runs[k]
	}
	if n != l.Frames {
		return fmt.Errorf("frame log: runs of %d frames, the log says %d", n, l.Frames)
	}
	return nil
}

// WriteTo writes the log compactly: unsigned varints of the taps, the frames, the number of
// runs and every value of every run.
func (l *Log) WriteTo(w io.Writer) (int64, error) {
	var b []byte
	b = binary.AppendUvarint(b, uint64(l.Taps))
	b = binary.AppendUvarint(b, uint64(l.Frames))
	runs := len(l.Runs)
	if l.Dropped {
		runs = 0
		b = binary.AppendUvarint(b, 1)
	} else {
		b = binary.AppendUvarint(b, 0)
	}
	b = binary.AppendUvarint(b, uint64(runs))
	for _, v := range l.Runs {
		b = binary.AppendUvarint(b, uint64(v))
	}
	n, err := w.Write(b)
	return int64(n), err
}

// Read reads a log written by WriteTo and checks it.
func Read(r *bufio.Reader) (*Log, error) {
	var v [4]uint64
	for i := range v {
		x, err := binary.ReadUvarint(r)
		if err != nil {
			return nil, err
		}
		v[i] = x
	}
	if v[0] > 1<<16 || v[3] > MaxValues {
		return nil, errors.New("frame log: implausible size")
	}
	l := &Log{Taps: int(v[0]), Frames: int64(v[1]), Dropped: v[2] == 1}
	l.Runs = make([]int64, v[3])
	for i := range l.Runs {
		x, err := binary.ReadUvarint(r)
		if err != nil {
			return nil, err
		}
		l.Runs[i] = int64(x)
	}
	return l, l.Check()
}

// Pair walks the first n frames of two logs together, calling fn for each stretch of frames
// over which neither log's counts change: its length and each log's counts (tap i's trials and
// errors at 2i, 2i+1). n beyond either log is cut to the shorter.
func Pair(a, b *Log, n int64, fn func(count int64, ca, cb []int64)) {
	if !a.Usable() || !b.Usable() {
		return
	}
	n = min(n, a.Frames, b.Frames)
	sa, sb := a.stride(), b.stride()
	i, j := 0, 0
	var leftA, leftB int64
	if len(a.Runs) > 0 {
		leftA = a.Runs[0]
	}
	if len(b.Runs) > 0 {
		leftB = b.Runs[0]
	}
	for at := int64(0); at < n; {
		m := min(leftA, leftB, n-at)
		fn(m, a.Runs[i+1:i+sa], b.Runs[j+1:j+sb])
		at += m
		if leftA -= m; leftA == 0 && i+sa < len(a.Runs) {
			i += sa
			leftA = a.Runs[i]
		}
		if leftB -= m; leftB == 0 && j+sb < len(b.Runs) {
			j += sb
			leftB = b.Runs[j]
		}
	}
}
