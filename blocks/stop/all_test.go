package stop_test

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"tally/blocks/link"
	"tally/blocks/stats"
	"tally/blocks/stop"
)

// "At least 20 frames and 100 errors": a burst of 125 errors in the first 2 frames does not
// end the point; 100 errors after 20 frames do.
func ExampleAll() {
	r := stop.All(stop.Errors(100), stop.Frames(20))
	fmt.Println(r.Name(), r.Met(at(125, 8192, 2, 2)), r.Met(at(100, 90112, 15, 22)))
	// Output: all(errors,frames) false true
}

func ExampleFrames() {
	r := stop.Frames(20)
	fmt.Println(r.Name(), r.Met(at(0, 4096*19, 0, 19)), r.Met(at(0, 4096*20, 0, 20)))
	// Output: frames false true
}

func TestAllErr(t *testing.T) {
	for _, c := range []struct {
		r    *stop.AllOf
		want string
	}{
		{stop.All(), "stop.All: no rules given"},
		{stop.All(stop.Errors(10), nil), "stop.All: rule 2 is nil"},
		{stop.All(stop.Errors(0), stop.Frames(20)), "stop.All: stop.Errors: count 0 must be at least 1"},
		{stop.All(stop.Errors(10), stop.Frames(0)), "stop.All: stop.Frames: count 0 must be at least 1"},
	} {
		if err := c.r.Err(); err == nil || err.Error() != c.want {
			t.Errorf("%s: error %v, want %q", c.r.Name(), err, c.want)
		}
	}
	if stop.All().Met(at(10, 10, 1, 1)) {
		t.Error("an All with no rules is met")
	}
	if err := stop.All(stop.Errors(100), stop.Frames(20), stop.Bits(1e6)).Err(); err != nil {
		t.Error(err)
	}
}

// EndedBy names the error count whose interval applies: the count's own rule when it was met
// last, nothing when the point ended at its minimum of frames or bits with the errors already
// counted, or when another kind of rule shares the All.
func TestEndedBy(t *testing.T) {
	errs := stop.Errors(100)
	for _, c := range []struct {
		met  stop.Rule
		p    *stop.Progress
		want *stop.ErrorTarget
	}{
		{errs, at(100, 4096*7, 5, 7), errs},
		{stop.Bits(1e6), at(3, 1e6, 2, 250), nil},
		{stop.All(errs, stop.Frames(20)), at(100, 4096*35, 20, 35), errs}, // errors came last
		{stop.All(errs, stop.Frames(20)), at(125, 4096*20, 2, 20), nil},   // ended at the minimum
		{stop.All(stop.Frames(20), errs, stop.Bits(4096*30)), at(100, 4096*35, 20, 35), errs},
		{stop.All(errs, stop.Bits(4096*30)), at(130, 4096*30, 20, 30), nil},
		{stop.All(errs, stop.Precision(2)), at(100, 4096*35, 20, 35), nil},
		{stop.All(errs, stop.Errors(10).Tap(link.TapFER)), at(100, 4096*35, 20, 35), nil},
	} {
		if got := stop.EndedBy(c.met, c.p); got != c.want {
			t.Errorf("%s at %d frames, %d errors: %v, want %v", c.met.Name(), c.p.Frames, c.p.Counts[0].Errors, got, c.want)
		}
	}
}

// The interval of a point ended by All(Errors(r), Frames(m)), taken as the runner takes it
// (EndedBy, then stats.ForFrames with Clopper–Pearson), covers the true rate in at least 95 %
// of points: the stage-wise ordering of the outcomes (stop frame, errors) is exact for any
// stopping rule (Jennison and Turnbull, Technometrics 25, 1983), and under this rule its
// tails are those of inverse sampling after frame m and the binomial tails of Clopper and
// Pearson (Biometrika 26, 1934) at frame m. The rates put the end at the minimum on about
// none, half and all of the points.
func TestAllIntervalCovers(t *testing.T) {
	const (
		r, m, frameLen = 10, 20, 64
		points         = 3000
		confidence     = 0.95
	)
	rnd := rand.New(rand.NewPCG(3, 4))
	rule := stop.All(stop.Errors(r), stop.Frames(m))
	for _, p := range []float64{0.003, 0.008, 0.03} {
		var covered, atMin int
		for range points {
			pr := &stop.Progress{Taps: []string{link.TapBER}, Counts: make([]link.Tally, 1)}
			for !rule.Met(pr) {
				var e int64
				for range frameLen {
					if rnd.Float64() < p {
						e++
					}
				}
				pr.Counts[0].Add(link.Tally{Trials: frameLen, Errors: e})
				pr.Frames++
			}
			var target int64
			if et := stop.EndedBy(rule, pr); et != nil {
				target = et.Count
			} else {
				atMin++
			}
			est, err := stats.ForFrames(pr.Counts[0], pr.Frames, confidence, "", target)
			if err != nil {
				t.Fatalf("p %g, %d errors in %d frames: %v", p, pr.Counts[0].Errors, pr.Frames, err)
			}
			if est.Low <= p && p <= est.High {
				covered++
			}
		}
		share := float64(covered) / points
		t.Logf("p %g: %d of %d points ended at the minimum, coverage %.4f", p, atMin, points, share)
		if min := confidence - 3*math.Sqrt(confidence*(1-confidence)/points); share < min {
			t.Errorf("p %g: coverage %.4f, want at least %.3f (95 %% less 3 standard errors)", p, share, min)
		}
	}
}
