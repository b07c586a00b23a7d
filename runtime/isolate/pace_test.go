package isolate

import (
	"testing"
	"time"

	"tally/blocks/link"
	"tally/blocks/stop"
	"tally/runtime/internal/wire"
)

// liveAt is a progress report of point index (of total) with frames committed, bits each and no
// errors, under a bit cap: the rule a time left can be extrapolated from.
func liveAt(index, total int, frames, capBits int64, elapsed time.Duration) *wire.Live {
	pr := stop.Progress{Frames: frames, Elapsed: elapsed, Taps: []string{link.TapBER},
		Counts: []link.Tally{{Trials: frames * 1000}}}
	return &wire.Live{Index: index, Total: total, Prefix: pr, Bits: []stop.BitCap{*stop.Bits(float64(capBits))}}
}

// The guess of the time left follows the reports: nothing to go on at a point's start, the
// rule's extrapolation once frames are committed, the finished points' mean for the points
// after the running one.
func TestPaceRemaining(t *testing.T) {
	t0 := time.Unix(1000, 0)
	p := newPace(t0)
	if _, ok := p.remaining(t0.Add(10 * time.Millisecond)); ok {
		t.Fatal("a guess before any report")
	}
	if !p.shouldHand(t0.Add(10 * time.Millisecond)) {
		t.Error("with nothing to go on the run is handed over (the compiled script is the faster)")
	}
	if p.shouldYield(t0.Add(yieldBlind / 2)) {
		t.Error("yielded before the run showed anything, within yieldBlind")
	}
	if !p.shouldYield(t0.Add(yieldBlind)) {
		t.Error("did not yield after yieldBlind with nothing to go on (slow first frames)")
	}

	// Point 0 of 4 starts; 10 frames of 1000 bits in 100 ms of a 100 000-bit cap: 900 ms left.
	p.live(liveAt(0, 4, 0, 100000, 0), t0)
	p.live(liveAt(0, 4, 10, 100000, 100*time.Millisecond), t0.Add(100*time.Millisecond))
	left, ok := p.remaining(t0.Add(100 * time.Millisecond))
	// The running point's 0.9 s and three more of about its whole length (1 s).
	if !ok || left < 3500*time.Millisecond || left > 4500*time.Millisecond {
		t.Errorf("remaining = %v, %v; want about 3.9 s", left, ok)
	}
	// Point 0 ends after 1 s; point 1 starts: the finished point's time stands for each.
	p.point(4, t0.Add(time.Second))
	left, ok = p.remaining(t0.Add(time.Second))
	if !ok || left != 3*time.Second {
		t.Errorf("after a point of 1 s with 3 to go: remaining = %v, %v; want 3 s", left, ok)
	}
	// The last point, half done by the mean.
	p.point(4, t0.Add(2*time.Second))
	p.point(4, t0.Add(3*time.Second))
	left, ok = p.remaining(t0.Add(3500 * time.Millisecond))
	if !ok || left != 500*time.Millisecond {
		t.Errorf("last point half done: remaining = %v, %v; want 500 ms", left, ok)
	}
	if !p.shouldYield(t0.Add(3500*time.Millisecond)) || !p.shouldHand(t0.Add(3500*time.Millisecond)) {
		t.Error("500 ms left: should yield and hand over")
	}
	// Nearly done: ended interpreted.
	if p.shouldHand(t0.Add(3950*time.Millisecond)) || p.shouldYield(t0.Add(3950*time.Millisecond)) {
		t.Error("50 ms left: should neither yield nor hand over")
	}
}

// A sweep of many quick points is judged by their mean: 90 points of 5 ms, 60 done, leave
// 150 ms, which is not worth a hand-over.
func TestPaceManyQuickPoints(t *testing.T) {
	t0 := time.Unix(1000, 0)
	p := newPace(t0)
	now := t0
	for range 60 {
		p.live(liveAt(0, 90, 0, 0, 0), now) // each point's start report
		now = now.Add(5 * time.Millisecond)
		p.point(90, now)
	}
	left, ok := p.remaining(now)
	if !ok || left != 29*5*time.Millisecond+5*time.Millisecond {
		t.Errorf("remaining = %v, %v; want 150 ms", left, ok)
	}
	if p.shouldHand(now.Add(2 * time.Millisecond)) {
		t.Error("under 150 ms left in quick points: handed over")
	}
	// Every point reported: nothing is left to hand over, whatever the mean.
	for range 30 {
		p.point(90, now)
	}
	if left, ok := p.remaining(now.Add(time.Second)); !ok || left != 0 || p.shouldHand(now.Add(time.Second)) {
		t.Errorf("after the last point: remaining %v, %v", left, ok)
	}
}

// A point with no rule to extrapolate yet (an error count before its first error) that runs
// past the mean of the points before it is guessed to need at least as long again: the slow
// last point of a sweep is still worth a hand-over.
func TestPaceSlowLastPoint(t *testing.T) {
	t0 := time.Unix(1000, 0)
	p := newPace(t0)
	for k := range 4 {
		p.point(5, t0.Add(time.Duration(k+1)*20*time.Millisecond))
	}
	now := t0.Add(80 * time.Millisecond).Add(2 * time.Second) // the last point, 2 s in, no error yet
	left, ok := p.remaining(now)
	if !ok || left != 2*time.Second || !p.shouldHand(now) {
		t.Errorf("last point 2 s in with no projection: remaining %v, %v; want 2 s, handed over", left, ok)
	}
}
