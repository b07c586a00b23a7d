package stop_test

import (
	"math"
	"math/rand/v2"
	"testing"

	"tally/blocks/link"
	"tally/blocks/stats"
	"tally/blocks/stop"
)

// errorStream is a run of independent trials with error probability p, drawn as geometric
// gaps between errors.
type errorStream struct {
	rnd  *rand.Rand
	logq float64
	next int64
}

func newErrorStream(p float64, rnd *rand.Rand) *errorStream {
	s := &errorStream{rnd: rnd, logq: math.Log1p(-p)}
	s.next = s.gap()
	return s
}

func (s *errorStream) gap() int64 { return int64(math.Floor(math.Log(1-s.rnd.Float64()) / s.logq)) }

func (s *errorStream) upTo(to int64) (k int64) {
	for ; s.next < to; k++ {
		s.next += 1 + s.gap()
	}
	return k
}

// A claim must hold however often it is judged: with the rate exactly at the target and the
// rules judged after each of 200 frames, each claim may be made on at most 1 − confidence =
// 5 % of the points (Ville's inequality; a fixed-n interval judged this way claims on about
// half). 0.065 leaves 2 standard errors of the 1500-point share.
func TestClaimsHoldUnderRepeatedLooks(t *testing.T) {
	const (
		p      = 0.01
		frame  = 100
		frames = 200
		points = 1500
	)
	rnd := rand.New(rand.NewPCG(11, 12))
	below, above := stop.Below(p), stop.Above(p)
	var nb, na int
	for range points {
		s := newErrorStream(p, rnd)
		pr := &stop.Progress{Taps: []string{link.TapBER}, Counts: make([]link.Tally, 1)}
		for f := 0; f < frames; f++ {
			c := &pr.Counts[0]
			c.Add(link.Tally{Trials: frame, Errors: s.upTo(c.Trials + frame)})
			pr.Frames++
			if below.Met(pr) {
				nb++
				break
			}
			if above.Met(pr) {
				na++
				break
			}
		}
	}
	for _, c := range []struct {
		name string
		n    int
	}{{"below", nb}, {"above", na}} {
		share := float64(c.n) / points
		t.Logf("%s claimed on %.4f of points", c.name, share)
		if share > 0.065 {
			t.Errorf("%s claimed on %.3f of points at the target, want at most 0.05", c.name, share)
		}
	}
}

// A claim valid at any time is valid at a fixed time: with no errors, under clustering
// within frames a frame may fail whole, so the claim cannot come before the single-look bound
// on frames −ln(α)/t ≈ 3/t (rule of three on the frame count; Hanley and Lippman-Hand, JAMA
// 249, 1983). And true rates well away from the target are shown: 1/4 of it within 6/t
// frames, 4 times it within 10/t bits (errors one per frame, 1000-bit frames).
func TestClaimsNeedEvidence(t *testing.T) {
	const target = 1e-5
	for _, conf := range []float64{0.9, 0.95, 0.99} {
		single := int64(-math.Log(1-conf) / target * 0.999)
		if stop.Below(target).Level(conf).Met(at(0, single*1000, 0, single)) {
			t.Errorf("at %v, shown below with no errors in fewer frames than the single-look %d", conf, single)
		}
	}
	// The mean counts of a rate of target/4 over 6/target frames, and of 4·target over 10/target bits.
	if !stop.Below(target).Met(at(150, 6e8, 0, 6e5)) {
		t.Error("150 errors in 6e8 bits (6e5 frames) not shown below 1e-5")
	}
	if !stop.Above(target).Met(at(40, 10/target, 0, 1000)) {
		t.Error("40 errors in 1e6 bits not shown above 1e-5")
	}
	if stop.Below(target).Met(at(40, 10/target, 0, 1000)) || stop.Above(target).Met(at(150, 6e8, 0, 6e5)) {
		t.Error("a claim against the evidence")
	}
}

func TestEvidenceStartsAtZero(t *testing.T) {
	for _, below := range []bool{true, false} {
		if e := stats.Evidence(0, 0, 1e-3, below); e != 0 {
			t.Errorf("evidence with no trials = %g, want 0 (M = 1)", e)
		}
	}
}
