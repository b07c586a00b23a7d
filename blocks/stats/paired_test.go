package stats

import (
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
	"gonum.org/v1/gonum/stat"
	"gonum.org/v1/gonum/stat/distuv"
)

// pairFrames draws frames of m trials for two variants on common random numbers: each trial
// is wrong in A when its uniform u < pA and in B when u < pB (monotone decisions on the same
// draw, as a threshold detector on the same noise). With burst > 0 a frame is hit, with
// chance burst, by an extra run of errors in both variants (a deep fade or a decoder error
// event) of a length drawn uniformly in [1, 2·runLen]: errors that cluster within frames.
type pairFrames struct {
	m             int
	pA, pB        float64
	burst         float64
	runLen        int
	src           *rand.Rand
	shareBurstOff bool // bursts hit A and B independently (same rate) instead of together
}

// frame draws one frame's errors in A and B and the trials wrong in one only.
func (g *pairFrames) frame() (ea, eb, onlyA, onlyB int64) {
	// Per trial, u < min(pA,pB): both wrong; between: only the one with the larger rate.
	lo, hi := math.Min(g.pA, g.pB), math.Max(g.pA, g.pB)
	both := binom(g.src, g.m, lo)
	one := binom(g.src, g.m-both, (hi-lo)/(1-lo))
	ea, eb = int64(both), int64(both)
	if g.pA > g.pB {
		ea += int64(one)
		onlyA = int64(one)
	} else {
		eb += int64(one)
		onlyB = int64(one)
	}
	if g.burst > 0 && g.src.Float64() < g.burst {
		l := int64(1 + g.src.IntN(2*g.runLen))
		if !g.shareBurstOff {
			ea, eb = min(ea+l, int64(g.m)), min(eb+l, int64(g.m))
		} else if g.src.IntN(2) == 0 {
			ea = min(ea+l, int64(g.m))
		} else {
			eb = min(eb+l, int64(g.m))
		}
	}
	return ea, eb, onlyA, onlyB
}

// rates are the true error rates of A and B per trial.
func (g *pairFrames) rates() (a, b float64) {
	if g.burst == 0 {
		return g.pA, g.pB
	}
	// A burst adds on average (2·runLen+1)/2 errors, fewer where the frame is already wrong
	// (negligible at these rates; the truth is then estimated by simulation, see trueRates).
	mean := float64(2*g.runLen+1) / 2 / float64(g.m)
	if g.shareBurstOff {
		return g.pA + g.burst*mean/2, g.pB + g.burst*mean/2
	}
	return g.pA + g.burst*mean, g.pB + g.burst*mean
}

func binom(r *rand.Rand, n int, p float64) int {
	if p <= 0 || n == 0 {
		return 0
	}
	return int(distuv.Binomial{N: float64(n), P: p, Src: r}.Rand())
}

// The comparison's mean and variance are those of the per-frame differences X_f, and its
// p-value and interval are those of Robbins' normal mixture: checked against gonum's sample
// moments and a numerical integral of the mixture (Robbins, Ann. Math. Statist. 41, 1970;
// Waudby-Smith et al., Ann. Statist. 52, 2024, the Gaussian-mixture boundary with the sample
// variance, whose tuning ρ² = (−2 ln α + ln(1 − 2 ln α))/n* is recalled from memory).
func TestPairedAgainstMixture(t *testing.T) {
	g := &pairFrames{m: 200, pA: 0.02, pB: 0.024, burst: 0.05, runLen: 4, src: rand.New(rand.NewPCG(1, 2))}
	var tally PairedTally
	var xs, xa, xb []float64
	for range 3000 {
		ea, eb, oa, ob := g.frame()
		tally.Add(ea, eb, 200, 200, oa, ob)
		xa = append(xa, float64(ea)/200)
		xb = append(xb, float64(eb)/200)
		xs = append(xs, float64(eb)/200-float64(ea)/200)
	}
	const conf, planned = 0.95, 2000
	c := ComparePairedPlanned(tally, conf, planned)
	if d := stat.Mean(xs, nil); math.Abs(c.Diff-d) > 1e-12 {
		t.Errorf("Diff %g, mean of frame differences %g", c.Diff, d)
	}
	s := math.Sqrt(stat.Variance(xs, nil))
	n := float64(len(xs))
	alpha := 1 - conf
	rho2 := (-2*math.Log(alpha) + math.Log1p(-2*math.Log(alpha))) / planned
	// Robbins' mixture of exp(λS − λ²n/2) over λ ~ N(0, ρ²), S = Σ(X_f − μ)/s.
	mixture := func(mu float64) float64 {
		sum := n * (c.Diff - mu) / s
		centre, width := sum/(n+1/rho2), 1/math.Sqrt(n+1/rho2)
		f := func(l float64) float64 {
			return math.Exp(l*sum-l*l*n/2) * distuv.Normal{Mu: 0, Sigma: math.Sqrt(rho2)}.Prob(l)
		}
		return quad.Fixed(f, centre-15*width, centre+15*width, 400, quad.Legendre{}, 0)
	}
	if want := math.Min(1, 1/mixture(0)); math.Abs(c.P-want) > 1e-6*want {
		t.Errorf("P = %g, 1/mixture at no difference %g", c.P, want)
	}
	for _, end := range []float64{c.DiffLow, c.DiffHigh} {
		if m := mixture(end); math.Abs(m*alpha-1) > 1e-6 {
			t.Errorf("mixture at the interval's end %g is %g, want 1/α = %g", end, m, 1/alpha)
		}
	}
	if c.Shown != (c.P < alpha) {
		t.Errorf("Shown %v with P %g", c.Shown, c.P)
	}
	// Fieller: at each finite end r of the ratio interval, (b − r·a)² = k²·v(r), with the
	// sample covariances from gonum and k the diff interval's half width over s.
	k := (c.DiffHigh - c.Diff) / s
	saa, sbb, sab := stat.Variance(xa, nil), stat.Variance(xb, nil), stat.Covariance(xa, xb, nil)
	a, b := stat.Mean(xa, nil), stat.Mean(xb, nil)
	if math.Abs(c.Ratio-b/a) > 1e-12 {
		t.Errorf("Ratio %g, want %g", c.Ratio, b/a)
	}
	if !(c.RatioLow < c.Ratio && c.Ratio < c.RatioHigh) {
		t.Errorf("ratio %g outside its interval [%g, %g]", c.Ratio, c.RatioLow, c.RatioHigh)
	}
	for _, r := range []float64{c.RatioLow, c.RatioHigh} {
		lhs := (b - r*a) * (b - r*a)
		rhs := k * k * (sbb - 2*r*sab + r*r*saa)
		if math.Abs(lhs-rhs) > 1e-9*rhs {
			t.Errorf("Fieller end %g: (b − r·a)² = %g, k²·v(r) = %g", r, lhs, rhs)
		}
	}
	// The unpaired comparison adds the variances: a wider interval on the same bits.
	u := CompareUnpairedPlanned(tally, conf, planned)
	su := math.Sqrt(saa + sbb)
	if got := (u.DiffHigh - u.Diff) / k; math.Abs(got-su) > 1e-9*su {
		t.Errorf("unpaired half width / k = %g, want √(s_A²+s_B²) = %g", got, su)
	}
	if w := math.Max(1-c.RatioLow, c.RatioHigh-1); !c.Within(w+1e-9) || c.Within(w-1e-9) {
		t.Errorf("Within(%g) and the ratio interval [%g, %g] disagree", w, c.RatioLow, c.RatioHigh)
	}
	if !strings.HasPrefix(c.Method, PairedMethod) || !strings.HasPrefix(u.Method, UnpairedMethod) {
		t.Errorf("methods %q, %q", c.Method, u.Method)
	}
}

// Adding frames one by one and merging two tallies give the same sums.
func TestPairedMerge(t *testing.T) {
	g := &pairFrames{m: 64, pA: 0.05, pB: 0.03, src: rand.New(rand.NewPCG(3, 4))}
	var all, first, second PairedTally
	for i := range 500 {
		ea, eb, oa, ob := g.frame()
		all.Add(ea, eb, 64, 64, oa, ob)
		if i < 200 {
			first.Add(ea, eb, 64, 64, oa, ob)
		} else {
			second.Add(ea, eb, 64, 64, oa, ob)
		}
	}
	first.Merge(second)
	if first != all {
		t.Errorf("merged %+v, want %+v", first, all)
	}
}

// No errors in either variant: no difference shown, the ratio unknown, and the difference
// bounded by the exact zero-count limit 1 − α^(1/(n−1)) for a frame that differs from the
// first, at the frame level (Clopper and Pearson,
// Biometrika 26, 1934, one-sided, k = 0: UpperLimit here, computed from gonum's beta law).
func TestPairedNoErrors(t *testing.T) {
	const n = 3000
	tally := PairedTally{Frames: n, TrialsA: 1000 * n, TrialsB: 1000 * n}
	c := ComparePaired(tally, 0.95)
	u, err := UpperLimit(0, n-1, 0.95) // the frames after the first
	if err != nil {
		t.Fatal(err)
	}
	if c.Diff != 0 || c.Shown || c.P != 1 || !c.Same {
		t.Errorf("no errors: %+v", c)
	}
	if math.Abs(c.DiffHigh-u) > 1e-12 || math.Abs(c.DiffLow+u) > 1e-12 {
		t.Errorf("interval [%g, %g], want ±%g", c.DiffLow, c.DiffHigh, u)
	}
	if !math.IsNaN(c.Ratio) || c.RatioLow != 0 || !math.IsInf(c.RatioHigh, 1) {
		t.Errorf("ratio %g [%g, %g], want NaN [0, +Inf]", c.Ratio, c.RatioLow, c.RatioHigh)
	}
	if !strings.Contains(c.Verdict, "no difference shown") {
		t.Errorf("verdict %q", c.Verdict)
	}
}

// The same errors in every frame (a re-run of the same link and seed): the difference is
// exactly 0, Same is set, P = 1, and the interval is the zero-count bound, not a point.
func TestPairedIdenticalFrames(t *testing.T) {
	g := &pairFrames{m: 100, pA: 0.01, pB: 0.01, burst: 0.1, runLen: 3, src: rand.New(rand.NewPCG(5, 6))}
	var tally PairedTally
	for range 400 {
		ea, _, _, _ := g.frame()
		tally.Add(ea, ea, 100, 100, 0, 0)
	}
	c := ComparePaired(tally, 0.95)
	u, _ := UpperLimit(0, 399, 0.95)
	if !c.Same || c.Diff != 0 || c.P != 1 || c.Shown || c.Ratio != 1 {
		t.Errorf("identical frames: %+v", c)
	}
	if math.Abs(c.DiffHigh-u) > 1e-12 || math.Abs(c.DiffLow+u) > 1e-12 {
		t.Errorf("interval [%g, %g], want ±%g", c.DiffLow, c.DiffHigh, u)
	}
	if !(c.RatioLow < 1 && c.RatioHigh > 1) {
		t.Errorf("ratio interval [%g, %g] must hold 1 with room", c.RatioLow, c.RatioHigh)
	}
	if !strings.Contains(c.Verdict, "the same number of errors in each of the 400 frames") {
		t.Errorf("verdict %q", c.Verdict)
	}
	// The unpaired view of the same counts knows nothing of the pairing.
	if u := CompareUnpaired(tally, 0.95); u.Same || !(u.DiffHigh-u.DiffLow > 0) || u.Shown {
		t.Errorf("unpaired: %+v", u)
	}
}

// One frame, zero frames and nonsense.
func TestPairedEdges(t *testing.T) {
	var one PairedTally
	one.Add(3, 5, 100, 100, 0, 2)
	c := ComparePaired(one, 0.95)
	// One frame shows nothing of the spread: the whole range, no evidence.
	if c.Shown || c.DiffLow != -1 || c.DiffHigh != 1 || c.P != 1 || math.Abs(c.Diff-0.02) > 1e-15 ||
		c.Verdict != "not judged yet (1 of 30 frames)" {
		t.Errorf("one frame: %+v", c)
	}
	// Two frames alike, 2 errors more in B: the exact bound with one frame after the first,
	// q = 1 − α, and P = 1/(1 + 0.02).
	one.Add(3, 5, 100, 100, 0, 2)
	c = ComparePaired(one, 0.95)
	if c.Shown || math.Abs(c.DiffLow-(0.02-0.95*1.02)) > 1e-12 || math.Abs(c.DiffHigh-(0.02+0.95*0.98)) > 1e-12 {
		t.Errorf("two frames alike: %+v", c)
	}
	if want := 1 / 1.02; math.Abs(c.P-want) > 1e-12 {
		t.Errorf("two frames alike: P = %g, want (1+|c|)^−1 = %g", c.P, want)
	}
	// Frames that differ, fewer than MinPairedFrames: not judged.
	for range 10 {
		one.Add(1, 0, 100, 100, 1, 0)
	}
	if c := ComparePaired(one, 0.95); c.Shown || c.P != 1 || c.DiffLow != -1 || c.DiffHigh != 1 || c.Within(0.5) {
		t.Errorf("12 frames that differ: %+v", c)
	}
	z := ComparePaired(PairedTally{}, 0.95)
	if z.Shown || z.P != 1 || !math.IsNaN(z.Diff) || z.DiffLow != -1 || z.DiffHigh != 1 || z.Verdict != "no frames yet" {
		t.Errorf("zero frames: %+v", z)
	}
	for _, bad := range []struct {
		t    PairedTally
		conf float64
	}{
		{one, 0}, {one, 1}, {one, math.NaN()},
		{PairedTally{Frames: 2, TrialsA: 10, TrialsB: 10, ErrorsA: 11}, 0.95},
		{PairedTally{Frames: 2, TrialsA: 1, TrialsB: 10}, 0.95},
		{PairedTally{Frames: -1}, 0.95},
		// Σe² below (Σe)²/n, and Σe_A·e_B beyond Cauchy–Schwarz: no frames give these.
		{PairedTally{Frames: 2, TrialsA: 10, TrialsB: 10, ErrorsA: 4, SquaresA: 4}, 0.95},
		{PairedTally{Frames: 2, TrialsA: 10, TrialsB: 10, ErrorsA: 2, ErrorsB: 2, SquaresA: 4, SquaresB: 2, Cross: 5}, 0.95},
	} {
		c := ComparePaired(bad.t, bad.conf)
		if !math.IsNaN(c.P) || !math.IsNaN(c.Diff) || c.Shown || c.Verdict != "not judged" {
			t.Errorf("%+v at %g: %+v", bad.t, bad.conf, c)
		}
	}
}

// Only B made errors: the ratio is +Inf, A is not shown above 0, so the ratio interval is
// unbounded above.
func TestPairedOnlyB(t *testing.T) {
	var tally PairedTally
	for i := range 1000 {
		tally.Add(0, int64(i%3), 100, 100, 0, int64(i%3))
	}
	c := ComparePaired(tally, 0.95)
	if !math.IsInf(c.Ratio, 1) || !math.IsInf(c.RatioHigh, 1) || !(c.RatioLow >= 0) {
		t.Errorf("only B: ratio %g [%g, %g]", c.Ratio, c.RatioLow, c.RatioHigh)
	}
	if !c.Shown || c.Diff <= 0 || !strings.HasPrefix(c.Verdict, "B makes more errors than A (p ") {
		t.Errorf("only B, 1000 errors: %+v", c)
	}
	if got := c.VerdictFor("old", "new"); !strings.HasPrefix(got, "new makes more errors than old (p ") {
		t.Errorf("VerdictFor: %q", got)
	}
}

// A shows few errors (not shown above 0), B many: Fieller's set is two rays, and the ratio's
// interval is the ray [r2, +Inf) with r2 > 0 where (b − r·a)² = k²·v(r) (Fieller, J. R. Stat.
// Soc. B 16, 1954).
func TestPairedRatioRays(t *testing.T) {
	var tally PairedTally
	var xa, xb []float64
	for i := range 2000 {
		var ea int64
		if i%700 == 3 {
			ea = 1
		}
		eb := int64(i % 2)
		tally.Add(ea, eb, 100, 100, ea, eb)
		xa = append(xa, float64(ea)/100)
		xb = append(xb, float64(eb)/100)
	}
	c := ComparePaired(tally, 0.95)
	if !math.IsInf(c.RatioHigh, 1) || !(c.RatioLow > 0) || !(c.RatioLow < c.Ratio) {
		t.Fatalf("ratio %g [%g, %g], want a ray [r2 > 0, +Inf)", c.Ratio, c.RatioLow, c.RatioHigh)
	}
	s := math.Sqrt(stat.Variance(xs(xa, xb), nil))
	k := (c.DiffHigh - c.Diff) / s
	a, b, r := stat.Mean(xa, nil), stat.Mean(xb, nil), c.RatioLow
	v := stat.Variance(xb, nil) - 2*r*stat.Covariance(xa, xb, nil) + r*r*stat.Variance(xa, nil)
	if lhs, rhs := (b-r*a)*(b-r*a), k*k*v; math.Abs(lhs-rhs) > 1e-9*rhs {
		t.Errorf("at r2 = %g: (b − r·a)² = %g, k²·v(r) = %g", r, lhs, rhs)
	}
}

// xs is the per-frame differences b − a.
func xs(a, b []float64) []float64 {
	d := make([]float64, len(a))
	for i := range a {
		d[i] = b[i] - a[i]
	}
	return d
}

// P-values print as a person reads them (common practice, no source).
func TestFormatP(t *testing.T) {
	for p, want := range map[float64]string{
		0: "p < 1e-300", 7.2e-310: "p < 1e-300", 2.3e-58: "p = 2.3e-58", 3.1e-5: "p = 3.1e-5",
		0.05: "p = 0.05", 0.41: "p = 0.41", 1: "p = 1", 0.9996: "p = 1", 1.0000001: "p = 1",
		0.0123: "p = 0.012", math.NaN(): "p not judged",
	} {
		if got := FormatP(p); got != want {
			t.Errorf("FormatP(%g) = %q, want %q", p, got, want)
		}
	}
}
