package stats

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"

	"tally/blocks/link"
)

// stoppedCount is one point of a link with 1-in-1/p errors seen through frames of m bits,
// stopped at the first frame boundary with at least target errors: the frame counts are
// simulated directly from the gaps between errors (geometric for independent errors), not
// bit by bit. burst > 0 makes errors come in bursts: burst starts at rate p/burst per bit,
// each burst a run of consecutive wrong bits of geometric length with mean burst, so the BER
// is still about p.
func stoppedCount(r *rand.Rand, p float64, m, target int64, burst float64) link.Tally {
	geo := func(q float64) int64 { // trials up to and including the first success
		return int64(math.Floor(math.Log(1-r.Float64())/math.Log1p(-q))) + 1
	}
	var t link.Tally
	frame, inFrame := int64(0), int64(0)
	closeTo := func(f int64) { // close frames up to f (exclusive)
		for ; frame < f; frame++ {
			t.Add(link.Tally{Trials: m, Errors: inFrame})
			inFrame = 0
		}
	}
	pos := int64(-1)
	rate := p
	if burst > 0 {
		rate = p / burst
	}
	for {
		pos += geo(rate)
		n := int64(1)
		if burst > 0 {
			n = geo(1 / burst)
		}
		for i := range n {
			f := (pos + i) / m
			if f != frame {
				if t.Errors+inFrame >= target {
					closeTo(frame + 1)
					return t
				}
				closeTo(f)
			}
			inFrame++
		}
		pos += n - 1
		if t.Errors+inFrame >= target && (pos+1)%m == 0 {
			closeTo(frame + 1)
			return t
		}
	}
}

// With independent errors the burst test flags at most its nominal share of points, also
// where frames hold far fewer than one error (p = 1e-6 in 1024-bit frames; p = 1e-4 in 8-bit
// frames, BPSK over AWGN near 8.4 dB), where the χ² index-of-dispersion test flags about
// 5 %: 4000 replications of a 100-error stop each, flagged at most twice the nominal 0.001
// (the expected count is 4; 8 is the bound). Truly bursty errors (geometric bursts of mean 5
// and 20 bits, the same BER) are flagged in at least 90 % of points. (Common practice, no
// source: the definition of a test's level and power.)
func TestBurstTestLevelAndPower(t *testing.T) {
	if testing.Short() {
		t.Skip("simulation")
	}
	const sig, reps = 0.001, 4000
	for _, c := range []struct {
		p float64
		m int64
	}{{1e-6, 1024}, {1e-4, 8}, {1e-3, 1024}} {
		r := rand.New(rand.NewPCG(uint64(c.m), 13))
		flagged, chi := 0, 0
		for range reps {
			tl := stoppedCount(r, c.p, c.m, 100, 0)
			if Bursty(tl, sig) {
				flagged++
			}
			if chiSquareBursty(tl, sig) {
				chi++
			}
		}
		t.Logf("independent, p=%g, %d-bit frames: flagged %d of %d (χ² test: %d)", c.p, c.m, flagged, reps, chi)
		if flagged > 2*sig*reps {
			t.Errorf("independent errors, p=%g, %d-bit frames: flagged %d of %d, nominal %g", c.p, c.m, flagged, reps, sig*reps)
		}
	}
	for _, burst := range []float64{5, 20} {
		r := rand.New(rand.NewPCG(uint64(burst), 17))
		const n = 400
		flagged := 0
		for range n {
			if Bursty(stoppedCount(r, 1e-6, 1024, 100, burst), sig) {
				flagged++
			}
		}
		t.Logf("bursts of mean %g: flagged %d of %d", burst, flagged, n)
		if flagged < n*9/10 {
			t.Errorf("bursts of mean %g bits: flagged %d of %d, want at least 90 %%", burst, flagged, n)
		}
	}
}

// chiSquareBursty is the χ² index-of-dispersion test the burst test replaces, kept here to
// show where it fails.
func chiSquareBursty(t link.Tally, sig float64) bool {
	d := Dispersion(t)
	if math.IsNaN(d) {
		return false
	}
	df := float64(t.Frames - 1)
	return chiSquaredSurvival(df, df*d) < sig
}

// The exact conditional mean and variance of Σ e_f² against a full enumeration of the ways
// k errors can lie on n frames of m trials (the definition of the law; common practice, no
// source).
func TestSquaresMomentsByEnumeration(t *testing.T) {
	for _, c := range [][3]int64{{3, 2, 3}, {4, 3, 5}, {2, 5, 4}, {5, 2, 1}, {3, 4, 12}} {
		n, m, k := c[0], c[1], c[2]
		total := int(n * m)
		var count, sum, sum2 float64
		for mask := 0; mask < 1<<total; mask++ {
			if popcount(mask) != int(k) {
				continue
			}
			var s float64
			for f := range int(n) {
				e := popcount((mask >> (f * int(m))) & (1<<m - 1))
				s += float64(e * e)
			}
			count++
			sum += s
			sum2 += s * s
		}
		mean := sum / count
		v := sum2/count - mean*mean
		gm, gv := squaresMoments(n, m, k)
		if math.Abs(gm-mean) > 1e-9*mean || math.Abs(gv-v) > 1e-9*math.Max(1, v) {
			t.Errorf("n=%d m=%d k=%d: mean %g var %g, enumeration %g %g", n, m, k, gm, gv, mean, v)
		}
	}
}

func popcount(x int) int {
	c := 0
	for ; x != 0; x &= x - 1 {
		c++
	}
	return c
}

func chiSquaredSurvival(df, x float64) float64 { return distuv.ChiSquared{K: df}.Survival(x) }
