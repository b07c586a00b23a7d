package stop_test

import (
	"math"
	"math/rand/v2"
	"testing"

	"tally/blocks/link"
	"tally/blocks/stats"
	"tally/blocks/stop"
)

// burstyFrame is one frame of m bits whose errors come in bursts: burst starts at rate p/l
// per bit, each burst a run of wrong bits of geometric length with mean l (cut at the frame's
// end), so the BER is close to p. Frames are independent, as the engine makes them.
func burstyFrame(r *rand.Rand, m int64, p, l float64) int64 {
	geo := func(q float64) int64 { return int64(math.Floor(math.Log(1-r.Float64())/math.Log1p(-q))) + 1 }
	var e int64
	for pos := geo(p/l) - 1; pos < m; pos += geo(p / l) {
		n := min(geo(1/l), m-pos)
		e += n
		pos += n - 1
	}
	return e
}

// Claims hold when errors cluster: with errors in bursts of mean 5 and 20 bits, a true BER of
// twice the target is claimed "below" on at most 1 − confidence = 5 % of points, and half the
// target "above" on at most 5 %, the rules judged after every one of 2000 frames (Ville's
// inequality for the frame-level test; the bound is the definition of the claim's level). The
// bit-level likelihood ratio (stats.Evidence, independent bits assumed) fails this: its share
// of false claims in the first 20 frames alone is logged. Rates well away from the target are still shown within the 2000 frames on most
// points (a quarter of it below, four times it above).
func TestClaimsHoldWhenErrorsCluster(t *testing.T) {
	if testing.Short() {
		t.Skip("simulation")
	}
	const (
		target = 0.01
		m      = 256
		frames = 2000
		points = 300
	)
	run := func(rnd *rand.Rand, p, l float64, rule stop.Rule, bitLevel func(link.Tally) bool) (claims, bitClaims int) {
		for range points {
			pr := &stop.Progress{Taps: []string{link.TapBER}, Counts: make([]link.Tally, 1)}
			bitDone := false
			for f := range frames {
				pr.Counts[0].Add(link.Tally{Trials: m, Errors: burstyFrame(rnd, m, p, l)})
				pr.Frames++
				if !bitDone && bitLevel != nil && f < 20 && bitLevel(pr.Counts[0]) {
					bitDone = true
					bitClaims++
				}
				if rule.Met(pr) {
					claims++
					break
				}
			}
		}
		return claims, bitClaims
	}
	level := -math.Log(0.05)
	for _, l := range []float64{5, 20} {
		rnd := rand.New(rand.NewPCG(uint64(l), 3))
		nb, bits := run(rnd, 2*target, l, stop.Below(target), func(c link.Tally) bool {
			return stats.Evidence(c.Errors, c.Trials, target, true) >= level
		})
		na, _ := run(rnd, target/2, l, stop.Above(target), nil)
		sb, _ := run(rnd, target/4, l, stop.Below(target), nil)
		sa, _ := run(rnd, 4*target, l, stop.Above(target), nil)
		t.Logf("bursts of mean %g: BER 2t claimed below on %d of %d (bit-level test, first 20 frames: %d); t/2 above on %d; t/4 shown below on %d; 4t above on %d",
			l, nb, points, bits, na, sb, sa)
		if nb > points*5/100 || na > points*5/100 {
			t.Errorf("bursts of mean %g: false claims below %d, above %d of %d points, want at most 5 %%", l, nb, na, points)
		}
		if sb < points*8/10 || sa < points*8/10 {
			t.Errorf("bursts of mean %g: true claims below %d, above %d of %d points, want at least 80 %%", l, sb, sa, points)
		}
	}
}
