package stats_test

import (
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/stat/combin"
	"gonum.org/v1/gonum/stat/distuv"

	"tally/blocks/link"
	"tally/blocks/stats"
)

// nbCDF is P(N ≤ n) for N the trial of the r-th error, summed from the negative-binomial
// probabilities P(N = j) = C(j−1, r−1) p^r (1−p)^(j−r) (Haldane, Biometrika 33, 1945).
func nbCDF(r, n int, p float64) float64 {
	var s float64
	for j := r; j <= n; j++ {
		s += float64(combin.Binomial(j-1, r-1)) * math.Pow(p, float64(r)) * math.Pow(1-p, float64(j-r))
	}
	return s
}

// Trial by trial, the limits cut α/2 off each tail of the negative-binomial N, summed from
// its probabilities, and the estimate is Haldane's (r−1)/(n−1).
func TestInverseSamplingTrialByTrial(t *testing.T) {
	for _, c := range []struct{ r, n int }{{2, 30}, {3, 40}, {10, 200}, {25, 60}} {
		e, err := stats.InverseSampling(int64(c.r), int64(c.n), int64(c.n), int64(c.r), 0.95)
		if err != nil {
			t.Fatal(err)
		}
		if want := float64(c.r-1) / float64(c.n-1); !near(e.Rate, want, 1e-12) {
			t.Errorf("r=%d n=%d: rate %g, want Haldane's %g", c.r, c.n, e.Rate, want)
		}
		if got := nbCDF(c.r, c.n, e.Low); !near(got, 0.025, 1e-9) {
			t.Errorf("r=%d n=%d: P(N ≤ n | low) = %g, want 0.025", c.r, c.n, got)
		}
		if got := 1 - nbCDF(c.r, c.n-1, e.High); !near(got, 0.025, 1e-9) {
			t.Errorf("r=%d n=%d: P(N ≥ n | high) = %g, want 0.025", c.r, c.n, got)
		}
		cp, _ := stats.ClopperPearson(int64(c.r), int64(c.n), 0.95)
		if !(e.High < cp.High) || !near(e.Low, cp.Low, 1e-12) {
			t.Errorf("r=%d n=%d: %+v against Clopper–Pearson %+v: want the same low, a lower high", c.r, c.n, e, cp)
		}
		if e.Method != "negative-binomial" {
			t.Errorf("Method %q", e.Method)
		}
	}
}

// Unbiased in frames: the exact mean of the estimate over every outcome (F frames, k errors)
// of "stop at the first frame boundary with at least r errors" equals p. P(F = f, k) sums,
// over the j ≤ r−1 errors of the first (f−1)L trials, Bin((f−1)L, p)(j)·Bin(L, p)(k−j).
func TestInverseSamplingUnbiasedInFrames(t *testing.T) {
	for _, c := range []struct {
		L, r int64
		p    float64
	}{{3, 2, 0.2}, {8, 3, 0.05}, {1, 4, 0.1}, {50, 2, 0.1}} {
		var mean, total, naive float64
		for f := int64(1); f <= 4000; f++ {
			m := (f - 1) * c.L
			for k := c.r; k <= c.r-1+c.L; k++ {
				var pr float64
				for j := max(0, k-c.L); j <= min(c.r-1, m); j++ {
					pr += distuv.Binomial{N: float64(m), P: c.p}.Prob(float64(j)) * distuv.Binomial{N: float64(c.L), P: c.p}.Prob(float64(k-j))
				}
				if pr == 0 {
					continue
				}
				e, err := stats.InverseSampling(k, f*c.L, f, c.r, 0.95)
				if err != nil {
					t.Fatal(err)
				}
				mean += pr * e.Rate
				naive += pr * float64(k) / float64(f*c.L)
				total += pr
			}
		}
		if !near(total, 1, 1e-9) {
			t.Fatalf("L=%d r=%d: outcomes sum to %g", c.L, c.r, total)
		}
		if !near(mean/c.p, 1, 1e-6) {
			t.Errorf("L=%d r=%d p=%g: mean estimate %g, want p (k/n gives %g)", c.L, c.r, c.p, mean, naive)
		}
	}
}

func TestInverseSamplingInputs(t *testing.T) {
	// One frame: all that is known is k of n, with nothing before it.
	// The stage-wise interval is then Clopper–Pearson's.
	e, _ := stats.InverseSampling(5, 100, 1, 3, 0.95)
	cp, _ := stats.ClopperPearson(5, 100, 0.95)
	if e.Rate != 0.05 || !near(e.Low, cp.Low, 1e-12) || !near(e.High, cp.High, 1e-12) || e.Method != "stagewise" {
		t.Errorf("single frame: %+v, want rate 0.05 and Clopper–Pearson's %+v", e, cp)
	}
	for _, c := range []struct {
		k, n, frames, r int64
		want            string
	}{
		{5, 100, 10, 0, "target 0"},
		{2, 100, 10, 3, "short of the target"},
		{5, 100, 7, 3, "equal frames"},
		{5, 100, 0, 3, "equal frames"},
		{30, 100, 10, 3, "cannot have stopped"}, // 28 errors would have had to fit in the last 10 trials
		{5, 4, 4, 3, "exceed"},
	} {
		if _, err := stats.InverseSampling(c.k, c.n, c.frames, c.r, 0.95); err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%+v: %v, want %q", c, err, c.want)
		}
	}
}

func TestForFrames(t *testing.T) {
	tally := link.Tally{Trials: 40960, Errors: 12}
	e, err := stats.ForFrames(tally, 10, 0.95, "wilson", 10)
	if err != nil || e.Method != "stagewise" {
		t.Errorf("ended by errors: %+v %v, want stagewise", e, err)
	}
	e, err = stats.ForFrames(tally, 10, 0.95, "wilson", 0)
	if err != nil || e.Method != "wilson" {
		t.Errorf("ended otherwise: %+v %v, want wilson", e, err)
	}
	if _, err := stats.ForFrames(tally, 10, 0.95, "wald", 10); err == nil {
		t.Error("unknown method accepted under an error target")
	}
	if _, err := stats.ForPoint(link.Tally{}, 0.95, "nope", 0); err == nil {
		t.Error("ForPoint accepted an unknown method")
	}
	// Without frame counts ForPoint takes the count as stopped at its last error.
	p, err := stats.ForPoint(tally, 0.95, "", 10)
	if err != nil || p.Method != "negative-binomial" || !near(p.Rate, 11.0/40959, 1e-15) {
		t.Errorf("ForPoint: %+v %v, want the trial-by-trial estimate with target 12", p, err)
	}
	// With them it is ForFrames.
	tally.Frames = 10
	f, _ := stats.ForFrames(tally, 10, 0.95, "", 10)
	if p, _ := stats.ForPoint(tally, 0.95, "", 10); p != f {
		t.Errorf("ForPoint %+v, ForFrames %+v", p, f)
	}
}

// stageTails are the two stage-wise tails at p, summed directly from binomial probabilities:
// P(S_m ≥ r or S_n ≥ k) and P(S_m ≤ r−1, S_n ≤ k), S_m the errors of the m trials before the
// last frame of L.
func stageTails(k, m, L, r int64, p float64) (up, down float64) {
	sm, x := distuv.Binomial{N: float64(m), P: p}, distuv.Binomial{N: float64(L), P: p}
	up = 1 - sm.CDF(float64(r-1))
	for j := int64(0); j <= min(r-1, m); j++ {
		up += sm.Prob(float64(j)) * (1 - x.CDF(float64(k-j-1)))
		down += sm.Prob(float64(j)) * x.CDF(float64(k-j))
	}
	return up, down
}

// In frames of L > 1 trials each limit cuts α/2 off its stage-wise tail, summed directly,
// and lies inside the limits from the frame count alone (B⁻¹(α/2; r, n−r+1) and
// B⁻¹(1−α/2; r, m−r+1), the formulas of InverseSampling's doc).
func TestInverseSamplingStagewiseTails(t *testing.T) {
	for _, c := range []struct{ k, frames, L, r int64 }{
		{12, 10, 4096, 10}, {105, 20, 2048, 100}, {158, 1, 2048, 100}, {130, 2, 2048, 100},
		{10, 7, 64, 10}, {14, 3, 512, 10}, {3, 40, 8, 2},
	} {
		n, m := c.frames*c.L, (c.frames-1)*c.L
		e, err := stats.InverseSampling(c.k, n, c.frames, c.r, 0.95)
		if err != nil {
			t.Fatal(err)
		}
		if up, _ := stageTails(c.k, m, c.L, c.r, e.Low); !near(up, 0.025, 1e-8) {
			t.Errorf("%+v: upper tail %g at low %g, want 0.025", c, up, e.Low)
		}
		if _, down := stageTails(c.k, m, c.L, c.r, e.High); !near(down, 0.025, 1e-8) {
			t.Errorf("%+v: lower tail %g at high %g, want 0.025", c, down, e.High)
		}
		nbLow := distuv.Beta{Alpha: float64(c.r), Beta: float64(n - c.r + 1)}.Quantile(0.025)
		nbHigh := 1.0
		if m >= c.r {
			nbHigh = distuv.Beta{Alpha: float64(c.r), Beta: float64(m - c.r + 1)}.Quantile(0.975)
		}
		if e.Low < nbLow-1e-12 || e.High > nbHigh+1e-12 || e.Method != "stagewise" {
			t.Errorf("%+v: %+v not within the frame-count limits [%g, %g]", c, e, nbLow, nbHigh)
		}
	}
}

// Exact coverage in frames: summed over every outcome (F, k) of "stop at the first frame
// boundary with at least r errors" (probabilities as in TestInverseSamplingUnbiasedInFrames),
// the 95 % interval holds p with probability at least 0.95 — exactness, checked without
// simulation noise.
func TestInverseSamplingStagewiseExactCoverage(t *testing.T) {
	for _, c := range []struct {
		L, r int64
		p    float64
	}{{16, 3, 0.3}, {16, 3, 0.05}, {32, 5, 0.2}, {8, 2, 0.02}, {64, 4, 0.1}} {
		var cov, total float64
		for f := int64(1); f <= 3000 && total < 1-1e-12; f++ {
			m := (f - 1) * c.L
			for k := c.r; k <= c.r-1+c.L; k++ {
				var pr float64
				for j := max(0, k-c.L); j <= min(c.r-1, m); j++ {
					pr += distuv.Binomial{N: float64(m), P: c.p}.Prob(float64(j)) * distuv.Binomial{N: float64(c.L), P: c.p}.Prob(float64(k-j))
				}
				if pr < 1e-15 {
					continue
				}
				e, err := stats.InverseSampling(k, f*c.L, f, c.r, 0.95)
				if err != nil {
					t.Fatal(err)
				}
				total += pr
				if e.Contains(c.p) {
					cov += pr
				}
			}
		}
		if !near(total, 1, 1e-9) {
			t.Fatalf("%+v: outcomes sum to %g", c, total)
		}
		if cov < 0.95-1e-9 {
			t.Errorf("%+v: exact coverage %.5f, want at least 0.95", c, cov)
		}
		t.Logf("L=%d r=%d p=%g: exact coverage %.5f", c.L, c.r, c.p, cov)
	}
}

// The example that showed the problem: BPSK at 0 dB (p ≈ 0.0786) in frames of 2048 bits,
// ended at 100 errors after one frame with 158. The frame count alone gave [0.0399, 1]; the
// interval must be within 1.3 times the Clopper–Pearson width on (158, 2048) (common
// practice, no source: the stopping hardly constrains a one-frame count). Two frames, too.
func TestInverseSamplingCoarseFrames(t *testing.T) {
	for _, c := range []struct{ k, frames int64 }{{158, 1}, {190, 2}, {230, 3}} {
		n := c.frames * 2048
		e, err := stats.InverseSampling(c.k, n, c.frames, 100, 0.95)
		if err != nil {
			t.Fatal(err)
		}
		cp, _ := stats.ClopperPearson(c.k, n, 0.95)
		if w, cw := e.High-e.Low, cp.High-cp.Low; w > 1.3*cw || !e.Contains(e.Rate) {
			t.Errorf("%d errors in %d frames: %+v, width %.4g against Clopper–Pearson's %.4g", c.k, c.frames, e, w, cw)
		}
	}
}
