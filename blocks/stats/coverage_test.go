package stats_test

import (
	"math"
	"math/rand/v2"
	"testing"
	"time"

	"tally/blocks/link"
	"tally/blocks/stats"
	"tally/blocks/stop"
)

// errorStream is a run of independent trials with error probability p, drawn as the gaps
// between errors (geometric: ⌊ln U / ln(1−p)⌋ trials without error before each error), so a
// long stretch costs one draw per error.
type errorStream struct {
	rnd  *rand.Rand
	logq float64
	next int64 // index of the next trial in error
}

func newErrorStream(p float64, rnd *rand.Rand) *errorStream {
	s := &errorStream{rnd: rnd, logq: math.Log1p(-p)}
	s.next = s.gap()
	return s
}

func (s *errorStream) gap() int64 {
	return int64(math.Floor(math.Log(1-s.rnd.Float64()) / s.logq)) // 1−U lies in (0, 1]
}

// upTo counts the errors among the trials before index to.
func (s *errorStream) upTo(to int64) int64 {
	var k int64
	for s.next < to {
		k++
		s.next += 1 + s.gap()
	}
	return k
}

// runPoint counts frames of size frame until one of the rules is met, judged after every
// frame as the engine does, and returns the counts, the frames and the rule met.
func runPoint(s *errorStream, frame int64, rules []stop.Rule) (link.Tally, int64, stop.Rule) {
	p := &stop.Progress{Taps: []string{link.TapBER}, Counts: make([]link.Tally, 1)}
	for {
		t := &p.Counts[0]
		t.Add(link.Tally{Trials: frame, Errors: s.upTo(t.Trials + frame)})
		p.Frames++
		for _, r := range rules {
			if r.Met(p) {
				return *t, p.Frames, r
			}
		}
	}
}

// The coverage of the reported 95 % interval under each stop rule, from repeated cheap
// Bernoulli experiments with a known p: the share of intervals holding p must be at least
// 0.945 (an exact interval's coverage is at least 0.95; 0.945 leaves 2 standard errors of
// the 10 000-run share). Frames of one trial are inverse sampling as Haldane (Biometrika 33,
// 1945) treats it; larger frames stop, as the engine does, at the first frame boundary past
// the target.
//
// For the error-count rules the mean estimate must also be within 2 % of p (Haldane's and
// InverseSampling's estimates are unbiased), where the fixed-n k/n is off by about
// 1/(r−1) (11 % at 10 errors).
func TestCoverageUnderStopRules(t *testing.T) {
	const runs = 10000
	for i, c := range []struct {
		name  string
		p     float64
		frame int64
		rules []stop.Rule
	}{
		{"bits", 0.002, 100, []stop.Rule{stop.Bits(5000)}},
		{"10 errors, trial by trial", 0.05, 1, []stop.Rule{stop.Errors(10)}},
		{"10 errors, frames of 256", 0.002, 256, []stop.Rule{stop.Errors(10)}},
		{"100 errors, trial by trial", 0.2, 1, []stop.Rule{stop.Errors(100)}},
		{"100 errors, frames of 1024", 0.001, 1024, []stop.Rule{stop.Errors(100)}},
		{"10 errors or bits", 5e-4, 64, []stop.Rule{stop.Errors(10), stop.Bits(20000)}},
		{"precision", 0.002, 1024, []stop.Rule{stop.Precision(3), stop.Bits(1e7)}},
	} {
		t0 := time.Now()
		rnd := rand.New(rand.NewPCG(2024, uint64(i)))
		var covered, byErrors int
		var sumRate, sumNaive float64
		for range runs {
			s := newErrorStream(c.p, rnd)
			tally, frames, rule := runPoint(s, c.frame, c.rules)
			var target int64
			if et, ok := rule.(*stop.ErrorTarget); ok {
				target = et.Count
				byErrors++
			}
			e, err := stats.ForFrames(tally, frames, 0.95, "", target)
			if err != nil {
				t.Fatalf("%s: %v", c.name, err)
			}
			if e.Contains(c.p) {
				covered++
			}
			sumRate += e.Rate
			sumNaive += float64(tally.Errors) / float64(tally.Trials)
			// ForPoint takes the frames from the tally.
			if f, _ := stats.ForPoint(tally, 0.95, "", target); f != e {
				t.Fatalf("%s: ForPoint %+v, ForFrames %+v", c.name, f, e)
			}
		}
		cov := float64(covered) / runs
		if cov < 0.945 {
			t.Errorf("%s: coverage %.4f, want at least 0.945", c.name, cov)
		}
		if byErrors == runs {
			bias, naive := sumRate/runs/c.p-1, sumNaive/runs/c.p-1
			if math.Abs(bias) > 0.02 {
				t.Errorf("%s: mean estimate off by %+.3f of p, want within 0.02", c.name, bias)
			}
			if c.name == "10 errors, trial by trial" && naive < 0.06 {
				t.Errorf("%s: k/n off by only %+.3f; expected about +0.11, the bias the estimator removes", c.name, naive)
			}
		}
		t.Logf("%-28s coverage %.4f, %d of %d ended by errors (%v)", c.name, cov, byErrors, runs, time.Since(t0))
	}
}

// Coverage in coarse frames, where a point ends after a frame or a few with well past r
// errors (the engine judges the rule at frame boundaries): frames of 2048 bits, the 95 %
// interval must hold p in at least 0.945 of 4000 runs (0.945 is about 2 standard errors
// below 0.95 at that count; common practice, no source), and be informative — its mean
// width within 1.3 times that of Clopper–Pearson on the same counts (common practice, no
// source).
func TestCoverageCoarseFrames(t *testing.T) {
	const runs, frame = 4000, 2048
	i := 0
	for _, r := range []int64{100, 10} {
		for _, p := range []float64{0.08, 0.02, 0.005} {
			i++
			rnd := rand.New(rand.NewPCG(4096, uint64(i)))
			var covered int
			var width, cpWidth float64
			for range runs {
				tally, frames, _ := runPoint(newErrorStream(p, rnd), frame, []stop.Rule{stop.Errors(r)})
				e, err := stats.ForFrames(tally, frames, 0.95, "", r)
				if err != nil {
					t.Fatalf("r=%d p=%g: %v", r, p, err)
				}
				if e.Contains(p) {
					covered++
				}
				cp, _ := stats.ClopperPearson(tally.Errors, tally.Trials, 0.95)
				width += e.High - e.Low
				cpWidth += cp.High - cp.Low
			}
			cov := float64(covered) / runs
			if cov < 0.945 {
				t.Errorf("r=%d p=%g: coverage %.4f, want at least 0.945", r, p, cov)
			}
			if width > 1.3*cpWidth {
				t.Errorf("r=%d p=%g: mean width %.4g, over 1.3 times Clopper–Pearson's %.4g", r, p, width/runs, cpWidth/runs)
			}
			t.Logf("r=%d p=%g: coverage %.4f, mean width %.4g (Clopper–Pearson %.4g)", r, p, cov, width/runs, cpWidth/runs)
		}
	}
}
