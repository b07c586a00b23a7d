package framelog

import (
	"bufio"
	"bytes"
	"math/rand/v2"
	"reflect"
	"slices"
	"testing"

	"tally/blocks/link"
)

// frames are per-frame counts of three taps as a link gives them: 2048 bits, a frame error
// when any bit is wrong, and a tap with varying trials.
func frames(n int, r *rand.Rand) [][]link.Tally {
	var out [][]link.Tally
	for range n {
		e := int64(0)
		if r.IntN(10) == 0 {
			e = int64(r.IntN(5))
		}
		fe := int64(0)
		if e > 0 {
			fe = 1
		}
		out = append(out, []link.Tally{{Trials: 2048, Errors: e}, {Trials: 1, Errors: fe}, {Trials: int64(100 + r.IntN(2)), Errors: e / 2}})
	}
	return out
}

// A log gives back every frame it was given, sums them as link.Tally.Add does (the engine's
// sum; common practice, no source), and survives its own file form.
func TestLogRoundTrip(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	in := frames(5000, r)
	l := New(3)
	want := make([]link.Tally, 3)
	for _, c := range in {
		l.Add(c)
		for i := range c {
			want[i].Add(c[i])
		}
	}
	if l.Frames != 5000 || len(l.Runs)/l.stride() >= 5000 {
		t.Fatalf("frames %d, runs %d: not run-length coded", l.Frames, len(l.Runs)/l.stride())
	}
	for k, c := range in {
		got, ok := l.Frame(int64(k))
		if !ok || !reflect.DeepEqual(got, c) {
			t.Fatalf("frame %d: %v, want %v", k, got, c)
		}
	}
	if _, ok := l.Frame(5000); ok {
		t.Error("a frame past the end")
	}
	if got := l.Sum(l.Frames); !reflect.DeepEqual(got, want) {
		t.Errorf("sum %v, want %v", got, want)
	}
	var b bytes.Buffer
	l.WriteTo(&b)
	back, err := Read(bufio.NewReader(&b))
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(back.Runs, l.Runs) || back.Frames != l.Frames || back.Taps != l.Taps {
		t.Error("the file form does not give the log back")
	}
	// A prefix sums the frames before it.
	part := make([]link.Tally, 3)
	for _, c := range in[:1234] {
		for i := range c {
			part[i].Add(c[i])
		}
	}
	if got := l.Sum(1234); !reflect.DeepEqual(got, part) {
		t.Errorf("sum of 1234 frames %v, want %v", got, part)
	}
}

// Weighted counts are not kept: the log says so instead of holding half of them.
func TestLogDropsWeighted(t *testing.T) {
	l := New(1)
	l.Add([]link.Tally{{Trials: 10, Errors: 1}})
	l.Add([]link.Tally{{Trials: 10, Estimator: link.Importance, Weight: 1e-9}})
	if l.Usable() {
		t.Error("a log with weighted frames is usable")
	}
	if _, ok := l.Frame(0); ok {
		t.Error("a dropped log gives frames")
	}
}

// A damaged log is refused, never read as another.
func TestLogDamaged(t *testing.T) {
	l := New(1)
	for range 10 {
		l.Add([]link.Tally{{Trials: 10}})
	}
	l.Frames = 11
	if l.Check() == nil {
		t.Error("runs of 10 frames pass as 11")
	}
	var b bytes.Buffer
	l.WriteTo(&b)
	if _, err := Read(bufio.NewReader(&b)); err == nil {
		t.Error("a damaged log was read")
	}
}

// Pair gives every frame of the common prefix once, with both logs' counts for it.
func TestPair(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 4))
	fa, fb := frames(3000, r), frames(2500, r)
	a, b := New(3), New(3)
	for _, c := range fa {
		a.Add(c)
	}
	for _, c := range fb {
		b.Add(c)
	}
	var k int64
	Pair(a, b, 1<<40, func(m int64, ca, cb []int64) {
		for range m {
			for i := range 3 {
				if ca[2*i] != fa[k][i].Trials || ca[2*i+1] != fa[k][i].Errors || cb[2*i] != fb[k][i].Trials || cb[2*i+1] != fb[k][i].Errors {
					t.Fatalf("frame %d, tap %d: %v %v, want %v %v", k, i, ca, cb, fa[k], fb[k])
				}
			}
			k++
		}
	})
	if k != 2500 {
		t.Errorf("%d frames paired, want 2500", k)
	}
}

// Memory stays bounded: a log that would pass MaxValues is dropped, not grown.
func TestLogBounded(t *testing.T) {
	l := New(1)
	for k := range MaxValues {
		l.Add([]link.Tally{{Trials: 100, Errors: int64(k % 2)}})
	}
	if l.Usable() || len(l.Runs) != 0 {
		t.Errorf("a log of %d frames that all differ kept %d values", MaxValues, len(l.Runs))
	}
}

// AddN(c, n) keeps the same log as n calls of Add(c).
func TestAddNIsRepeatedAdd(t *testing.T) {
	a, b := New(1), New(1)
	for _, r := range []struct {
		errors int64
		n      int64
	}{{0, 5}, {0, 3}, {2, 1}, {1, 4}, {1, 2}} {
		c := []link.Tally{{Trials: 100, Errors: r.errors}}
		a.AddN(c, r.n)
		for range r.n {
			b.Add(c)
		}
	}
	if a.Frames != b.Frames || !slices.Equal(a.Runs, b.Runs) {
		t.Errorf("AddN: %d frames %v; Add: %d frames %v", a.Frames, a.Runs, b.Frames, b.Runs)
	}
}
