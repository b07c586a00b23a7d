package stats

import (
	"math"
	"math/rand/v2"
	"testing"

	"tally/blocks/link"
)

func frames(n, m int, gen func(r *rand.Rand) int64) link.Tally {
	r := rand.New(rand.NewPCG(7, 11))
	var t link.Tally
	for range n {
		t.Add(link.Tally{Trials: int64(m), Errors: gen(r)})
	}
	return t
}

// Independent bit errors: (n−1)·D is χ²(n−1)-distributed (Cochran, Biometrics, 1954), so D lies
// within its 99.9 % range, and the test rarely calls them bursty.
func TestDispersionIndependent(t *testing.T) {
	const n, m, p = 400, 1000, 0.01
	tl := frames(n, m, func(r *rand.Rand) int64 {
		var e int64
		for range m {
			if r.Float64() < p {
				e++
			}
		}
		return e
	})
	d := Dispersion(tl)
	// χ²(399) 0.05 % and 99.95 % points ≈ 318 and 492 (normal approximation, from memory).
	if d < 318.0/399 || d > 492.0/399 {
		t.Errorf("independent errors: D = %.3f, want about 1", d)
	}
	if Bursty(tl, 0.001) {
		t.Errorf("independent errors called bursty (D = %.3f)", d)
	}
}

// Whole frames lost at once (every bit of a frame wrong with probability q): the variance of a
// frame's count is m²q(1−q) against m·p(1−p) with p = q, so D = m (common practice, no source).
func TestDispersionWholeFrames(t *testing.T) {
	const n, m, q = 2000, 50, 0.1
	tl := frames(n, m, func(r *rand.Rand) int64 {
		if r.Float64() < q {
			return m
		}
		return 0
	})
	d := Dispersion(tl)
	if math.Abs(d/m-1) > 0.1 {
		t.Errorf("whole-frame errors: D = %.2f, want about %d", d, m)
	}
	if !Bursty(tl, 0.001) {
		t.Error("whole-frame errors not called bursty")
	}
	e, _ := ClopperPearson(tl.Errors, tl.Trials, 0.95)
	w, err := Clustered(tl, e, 0.95, "clopper-pearson")
	if err != nil {
		t.Fatal(err)
	}
	// The widened interval is about √D times the binomial one (Kish, Survey Sampling, 1965).
	ratio := (w.High - w.Low) / (e.High - e.Low)
	if math.Abs(ratio/math.Sqrt(d)-1) > 0.15 {
		t.Errorf("widening %.2f, want about √D = %.2f", ratio, math.Sqrt(d))
	}
}

func TestDispersionUndefined(t *testing.T) {
	for _, tl := range []link.Tally{{}, {Trials: 10, Errors: 0, Frames: 5}, {Trials: 10, Errors: 3, Frames: 1, Squares: 9}} {
		if !math.IsNaN(Dispersion(tl)) {
			t.Errorf("%+v: want NaN", tl)
		}
	}
}
