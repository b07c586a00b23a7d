package stats

import (
	"fmt"
	"math"
	"math/big"
	"strings"
)

// PairedTally sums, frame by frame, the counts of two variants A and B of a link run on the
// same frames: the same source bits, the same noise, the same fading (common random numbers).
// Every field is a plain sum over frames, so shards, checkpoints and resumed runs add them
// with Merge and get the same tally as one run over all the frames.
//
// With e_A, e_B a frame's errors, the sums are Errors = Σe, SquaresA = Σe_A², SquaresB = Σe_B²
// and Cross = Σe_A·e_B: enough for the frame-level variance of the difference (the frame is
// the independent unit; errors within a frame may cluster any way they like). OnlyA and OnlyB
// are the trials wrong in A but right in B and the reverse (McNemar's discordant counts),
// for reports; the comparison does not need them, and they are 0 when unknown.
//
// Frames are taken to hold the same number of trials in every frame for each variant (the
// average is used when they do not); A and B may count different trials per frame.
type PairedTally struct {
	Frames           int64
	TrialsA, TrialsB int64 // trials (bits or frames) counted
	ErrorsA, ErrorsB int64
	OnlyA, OnlyB     int64 // trials wrong in A but right in B, and the reverse; 0 when unknown

	SquaresA, SquaresB, Cross float64 // Σ e_A², Σ e_B², Σ e_A·e_B over frames (errors per frame)
}

// Add sums one frame: its errors and trials in A and B, and the trials wrong in one only.
func (t *PairedTally) Add(errA, errB, trialsA, trialsB, onlyA, onlyB int64) {
	t.Frames++
	t.TrialsA += trialsA
	t.TrialsB += trialsB
	t.ErrorsA += errA
	t.ErrorsB += errB
	t.OnlyA += onlyA
	t.OnlyB += onlyB
	a, b := float64(errA), float64(errB)
	t.SquaresA += a * a
	t.SquaresB += b * b
	t.Cross += a * b
}

// Merge adds the counts of o, another run of the same two variants on other frames.
func (t *PairedTally) Merge(o PairedTally) {
	t.Frames += o.Frames
	t.TrialsA += o.TrialsA
	t.TrialsB += o.TrialsB
	t.ErrorsA += o.ErrorsA
	t.ErrorsB += o.ErrorsB
	t.OnlyA += o.OnlyA
	t.OnlyB += o.OnlyB
	t.SquaresA += o.SquaresA
	t.SquaresB += o.SquaresB
	t.Cross += o.Cross
}

// Comparison is the result of comparing the error rates of two variants A and B.
//
// Diff is RateB − RateA and Ratio is RateB / RateA, each with an interval at the confidence
// level asked for; P is the p-value of "no difference" (RateA = RateB) and Shown reports that
// the difference is shown at that level: exactly when the Diff interval excludes 0, which is
// exactly when P < 1 − confidence. All of them are valid however long the count runs and
// whatever rule stops it, including a rule that watches this comparison (see
// ComparePairedPlanned for the method and its limits).
//
// Ratio is NaN when neither variant made an error (its interval [0, +Inf]: nothing is known
// of it) and +Inf when only B did; RatioHigh is +Inf whenever the counts do not show RateA
// above 0.
type Comparison struct {
	Frames       int64
	RateA, RateB float64

	Diff, DiffLow, DiffHigh    float64 // RateB − RateA and its interval
	Ratio, RatioLow, RatioHigh float64 // RateB / RateA and its interval

	P     float64 // p-value of "no difference", valid at any stopping time
	Shown bool    // the difference is shown at the confidence level
	Same  bool    // every frame held as many errors in A as in B (paired only)

	Verdict string // in words, with A and B as the names (see VerdictFor)
	Method  string // the method, as recorded in run.json
}

// PlannedFrames is the frame count the comparisons are tuned for when the caller names
// none: the intervals are narrowest there, wider by a slowly growing factor past it (1.3 times
// at 1000 times as many frames) and by a fast growing one before it (3 times at a hundredth),
// where the sample variance is least to be trusted. Simulated coverage is at or above nominal
// at every frame from 30 to 20 000 with this tuning, and was not with a tuning for 1000 frames
// (see TestPairedCoverage).
const PlannedFrames = 10000

// MinPairedFrames is the frame count below which a comparison whose frames differ is not
// judged (P = 1, intervals [−1, 1] and [0, +Inf]): the sample variance of a handful of frames
// is too uncertain for a normal approximation (at two frames the statistic has Student's law
// with one degree of freedom; common practice for normal approximations, no source).
const MinPairedFrames = 30

// Methods of ComparePaired and CompareUnpaired as recorded in run.json; the planned frame
// count is appended.
const (
	PairedMethod   = "paired frame-level differences, asymptotic confidence sequence (Waudby-Smith, Arbour, Sinha, Kennedy and Ramdas 2024), ratio by Fieller's method"
	UnpairedMethod = "unpaired: frame-level variances of A and B added as for independent runs, asymptotic confidence sequence (Waudby-Smith, Arbour, Sinha, Kennedy and Ramdas 2024), ratio by Fieller's method"
)

// ComparePaired compares the error rates of the two variants of a paired tally frame by
// frame, at a confidence level in (0, 1), tuned for PlannedFrames frames.
func ComparePaired(t PairedTally, confidence float64) Comparison {
	return ComparePairedPlanned(t, confidence, PlannedFrames)
}

// ComparePairedPlanned compares the error rates of the two variants of a paired tally frame
// by frame, at a confidence level in (0, 1), with the interval tuned to be narrowest after
// planned frames (any positive count keeps it valid; only the width depends on it).
//
// With m_A, m_B the trials per frame, each frame gives one paired difference
//
//	X_f = e_B,f/m_B − e_A,f/m_A,   X̄ = RateB − RateA,   s² = (ΣX_f² − (ΣX_f)²/n)/(n − 1),
//
// computed from the tally's sums (s² is the frame-level, cluster-robust variance: it needs
// only that frames are independent and alike, which the engine's keyed streams give, and
// nothing of how errors cluster within a frame; the common noise shows in s² through Cross).
//
// The interval is the asymptotic confidence sequence of Waudby-Smith, Arbour, Sinha, Kennedy
// and Ramdas ("Time-uniform central limit theory and asymptotic confidence sequences",
// Ann. Statist. 52, 2024, Robbins' normal mixture with the sample variance):
//
//	X̄ ± s·√( 2(nρ²+1)/(n²ρ²) · ln(√(nρ²+1)/α) ),   α = 1 − confidence,
//
// with ρ² = (−2 ln α + ln(1 − 2 ln α))/n*, which makes it narrowest at n* = planned frames
// (from memory: the same tuning as Howard, Ramdas, McAuliffe and Sekhon, "Time-uniform,
// nonparametric, nonasymptotic confidence sequences", Ann. Statist. 49, 2021). It covers the
// true difference at every frame count at once, with probability tending to 1 − α as the
// counts grow, so an interval read when any rule stops the count — a bit or error budget, or
// "stop when the difference is shown" — keeps its level: a fixed-n interval watched that way
// does not (Armitage, McPherson and Rowe, J. R. Stat. Soc. A 132, 1969). At 95 % it is 1.55
// times as wide as the fixed-n normal interval at n*, 2 times at 1000·n* or n*/10: the price
// of looking at every frame.
//
// P is the anytime p-value of the same mixture: with S = n·X̄/s,
//
//	M = (nρ²+1)^(−1/2) · exp(ρ²S²/(2(nρ²+1))),   P = min(1, 1/M),
//
// so P(P ever ≤ α) ≤ α under no difference (Ville's inequality: Ville, Étude critique de la
// notion de collectif, 1939), and P < α exactly when the interval excludes 0. Below
// MinPairedFrames frames that differ nothing is judged (P = 1, Diff in [−1, 1], ratio in
// [0, +Inf]).
//
// The ratio's interval is Fieller's (Fieller, "Some problems in interval estimation",
// J. R. Stat. Soc. B 16, 1954) on the same sequence: r is in it when the sequence for the
// mean of e_B/m_B − r·e_A/m_A holds 0, which solves a quadratic in r; it is cut to r ≥ 0,
// its upper end is +Inf when the counts do not show RateA above 0, and both ends are the
// hull when the set is two rays.
//
// Every frame identical (s = 0, and any single frame) is treated exactly rather than by the
// sequence, which would shrink to a point: when all n frames gave the same difference c
// (c = 0 when A and B made the same errors in every frame: the runs are the same on these
// frames, and Same is set), a frame that differs from the first has chance q ≤ 1 − α^(1/(n−1)),
// by Ville's inequality on the martingale (1−q)^(−(n−1)) of a run of frames after the first
// without one (the bound of the rule of three, holding at every n at once). A frame's
// difference lies in [−1, 1], so the interval is c + q·([−1, 1] − c) and P = (1 + |c|)^(−(n−1)).
// The bound is wide (about 3/n at 95 %) because nothing in the counts limits how badly a rare
// differing frame may differ; that is what identical frames show, and no more. One frame shows
// nothing: [−1, 1], P = 1. The ratio's interval is then 1 + Diff/RateA over the Diff
// interval, with RateA as counted (cut at 0; [0, +Inf] when A has no errors).
//
// The sequence is asymptotic: it assumes the frames seen show the spread of the differences.
// Variants whose errors cluster very differently can break that early in a run. In a
// simulation where A made part of its errors as 20-error bursts in one frame in 200 and B the
// same rate as scattered single errors, "stop when shown" wrongly claimed a difference in about
// a quarter of the runs, nearly all before A's first burst. On common random numbers the
// variants meet the same fades and bursts, and the coverage held in the simulations of
// TestPairedCoverage; an exact alternative for counts bounded only by the frame (as
// FrameEvidence is) would need thousands of frames' worth of differing errors to claim anything.
//
// Zero frames: rates NaN, Diff NaN with interval [−1, 1], P = 1. A confidence outside (0, 1),
// counts that are not counts, or a planned count below 1: every number NaN.
func ComparePairedPlanned(t PairedTally, confidence float64, planned int64) Comparison {
	return compare(t, confidence, planned, true)
}

// CompareUnpaired compares the same two variants as if they had been run independently,
// at a confidence level in (0, 1), tuned for PlannedFrames frames: the contrast that shows
// what pairing bought. See CompareUnpairedPlanned.
func CompareUnpaired(t PairedTally, confidence float64) Comparison {
	return CompareUnpairedPlanned(t, confidence, PlannedFrames)
}

// CompareUnpairedPlanned is ComparePairedPlanned with the frame-level variances of A and B
// added, s² = s_A² + s_B², as for two independent runs of n frames each (the Cross sum is not
// used). On common random numbers the variants' errors are positively correlated, and this
// interval is wider than the paired one by √(s_A² + s_B²)/s; for two runs that really were
// independent it is the right one. Same is never set. The Fieller ratio uses the same
// variances. When both variants gave every frame the same count it is treated as
// ComparePairedPlanned treats identical frames.
func CompareUnpairedPlanned(t PairedTally, confidence float64, planned int64) Comparison {
	return compare(t, confidence, planned, false)
}

func compare(t PairedTally, confidence float64, planned int64, paired bool) Comparison {
	method := UnpairedMethod
	if paired {
		method = PairedMethod
	}
	c := Comparison{Frames: t.Frames, Method: fmt.Sprintf("%s, tuned for %d frames", method, planned)}
	nan := math.NaN()
	if !(confidence > 0 && confidence < 1) || planned < 1 || t.Frames < 0 ||
		t.ErrorsA < 0 || t.ErrorsB < 0 || t.ErrorsA > t.TrialsA || t.ErrorsB > t.TrialsB ||
		(t.Frames > 0 && (t.TrialsA < t.Frames || t.TrialsB < t.Frames)) {
		return notJudged(c)
	}
	if t.Frames == 0 {
		c.RateA, c.RateB, c.Diff, c.DiffLow, c.DiffHigh = nan, nan, nan, -1, 1
		c.Ratio, c.RatioLow, c.RatioHigh, c.P = nan, 0, math.Inf(1), 1
		c.Verdict = c.VerdictFor("A", "B")
		return c
	}
	alpha := 1 - confidence
	n := float64(t.Frames)
	ma, mb := float64(t.TrialsA)/n, float64(t.TrialsB)/n
	ea, eb := float64(t.ErrorsA), float64(t.ErrorsB)
	c.RateA, c.RateB = ea/float64(t.TrialsA), eb/float64(t.TrialsB)
	c.Diff = c.RateB - c.RateA
	c.Ratio = c.RateB / c.RateA
	if t.ErrorsA == 0 {
		c.Ratio = nan
		if t.ErrorsB > 0 {
			c.Ratio = math.Inf(1)
		}
	}

	dd, caa, cbb, cab := spread(n, ma, mb, t, paired)
	if caa < 0 || cbb < 0 || cab*cab > caa*cbb*(1+1e-12) {
		return notJudged(c) // sums of squares that no counts give
	}
	if t.Frames < 2 || dd <= 0 {
		return identical(c, t, alpha, paired)
	}
	if t.Frames < MinPairedFrames {
		c.DiffLow, c.DiffHigh, c.RatioLow, c.RatioHigh, c.P = -1, 1, 0, math.Inf(1), 1
		c.Verdict = c.VerdictFor("A", "B")
		return c
	}
	den := n * (n - 1)
	s := math.Sqrt(dd/den) / (ma * mb)
	saa := caa / den / (ma * ma)
	sbb := cbb / den / (mb * mb)
	sab := cab / den / (ma * mb)

	rho2 := (-2*math.Log(alpha) + math.Log1p(-2*math.Log(alpha))) / float64(planned)
	v := n*rho2 + 1
	k := math.Sqrt(2 * v / (n * n * rho2) * (0.5*math.Log(v) - math.Log(alpha)))
	c.DiffLow, c.DiffHigh = math.Max(-1, c.Diff-k*s), math.Min(1, c.Diff+k*s)
	sn := n * c.Diff / s
	logp := 0.5*math.Log(v) - rho2*sn*sn/(2*v)
	c.P = math.Exp(math.Min(0, logp))
	c.Shown = c.DiffLow > 0 || c.DiffHigh < 0
	c.RatioLow, c.RatioHigh = fieller(c.RateA, c.RateB, saa, sbb, sab, k)
	c.Verdict = c.VerdictFor("A", "B")
	return c
}

// spread returns n(n−1)·m_A²m_B²·s², with s² the sample variance of the per-frame
// differences X_f = e_B/m_B − e_A/m_A (that of m_A·e_B − m_B·e_A), and n(n−1) times the
// sample variances and covariance of the per-frame counts; unpaired, the covariance is
// taken as 0. The first is exact, so that "every frame identical" (0) is told from a small
// spread without doubt: the sums are whole numbers, added and multiplied in float64 when
// every product stays below 2⁵³, where that is exact, and in big.Float otherwise.
func spread(n, ma, mb float64, t PairedTally, paired bool) (d, caa, cbb, cab float64) {
	ea, eb := float64(t.ErrorsA), float64(t.ErrorsB)
	w := 2.0
	if !paired {
		w = 0
	}
	const exact = 1 << 53
	top := math.Max(t.SquaresA, t.SquaresB)
	if ma == math.Trunc(ma) && mb == math.Trunc(mb) && n*top < exact && math.Max(ea, eb)*math.Max(ea, eb) < exact {
		caa, cbb, cab = n*t.SquaresA-ea*ea, n*t.SquaresB-eb*eb, n*t.Cross-ea*eb
		if !paired {
			cab = 0
		}
		x, y, z := ma*ma*cbb, mb*mb*caa, w*ma*mb*cab
		if math.Abs(x)+math.Abs(y)+math.Abs(z) < exact {
			return x + y - z, caa, cbb, cab
		}
	}
	f := func(x float64) *big.Float { return new(big.Float).SetPrec(prec).SetFloat64(x) }
	centred := func(sxy, sx, sy float64) *big.Float { // n·Σxy − Σx·Σy
		a := f(0).Mul(f(n), f(sxy))
		return a.Sub(a, f(0).Mul(f(sx), f(sy)))
	}
	ba, bb, bc := centred(t.SquaresA, ea, ea), centred(t.SquaresB, eb, eb), centred(t.Cross, ea, eb)
	sq := func(m float64) *big.Float { return f(0).Mul(f(m), f(m)) }
	sum := f(0).Mul(sq(ma), bb)
	sum.Add(sum, f(0).Mul(sq(mb), ba))
	sum.Sub(sum, f(0).Mul(f(0).Mul(f(w*ma), f(mb)), bc))
	d, _ = sum.Float64()
	caa, _ = ba.Float64()
	cbb, _ = bb.Float64()
	cab, _ = bc.Float64()
	if !paired {
		cab = 0
	}
	return d, caa, cbb, cab
}

// notJudged is the comparison of counts that are not counts: every number NaN.
func notJudged(c Comparison) Comparison {
	nan := math.NaN()
	c.RateA, c.RateB, c.Diff, c.DiffLow, c.DiffHigh = nan, nan, nan, nan, nan
	c.Ratio, c.RatioLow, c.RatioHigh, c.P = nan, nan, nan, nan
	c.Shown, c.Same = false, false
	c.Verdict = "not judged"
	return c
}

// prec is enough bits to hold the tally's products exactly.
const prec = 512

// identical is the comparison when every frame gave the same difference c (see
// ComparePairedPlanned): an exact bound on the chance q of a frame that differs.
func identical(c Comparison, t PairedTally, alpha float64, paired bool) Comparison {
	n := float64(t.Frames - 1) // frames after the first
	q := 1.0
	if n > 0 {
		q = -math.Expm1(math.Log(alpha) / n) // 1 − α^(1/n)
	}
	d := c.Diff
	c.DiffLow, c.DiffHigh = d-q*(1+d), d+q*(1-d)
	c.P = math.Exp(-n * math.Log1p(math.Abs(d)))
	c.Shown = c.DiffLow > 0 || c.DiffHigh < 0
	c.Same = paired && t.ErrorsA == t.ErrorsB && t.TrialsA == t.TrialsB && d == 0
	// The ratio by plugging in RateA: 1 + Diff/RateA over the Diff interval.
	switch {
	case c.RateA > 0:
		c.RatioLow = math.Max(0, (c.RateA+c.DiffLow)/c.RateA)
		c.RatioHigh = (c.RateA + c.DiffHigh) / c.RateA
	default:
		c.RatioLow, c.RatioHigh = 0, math.Inf(1)
	}
	c.Verdict = c.VerdictFor("A", "B")
	return c
}

// fieller is the set of r ≥ 0 with (b − r·a)² ≤ k²·(s_bb − 2r·s_ab + r²·s_aa): the ratio
// b/a's interval by Fieller's method, as its hull within [0, +Inf].
func fieller(a, b, saa, sbb, sab, k float64) (low, high float64) {
	k2 := k * k
	qa := a*a - k2*saa
	qb := -2 * (a*b - k2*sab)
	qc := b*b - k2*sbb
	disc := qb*qb - 4*qa*qc
	inf := math.Inf(1)
	if qa <= 0 {
		// A not shown above 0: the set is unbounded above.
		if qa == 0 || disc < 0 {
			return 0, inf
		}
		// Two rays (−∞, r1] ∪ [r2, ∞), r1 ≤ r2 (qa < 0 flips the roots' order).
		sq := math.Sqrt(disc)
		r1, r2 := (-qb+sq)/(2*qa), (-qb-sq)/(2*qa)
		if r1 >= 0 {
			return 0, inf
		}
		return math.Max(0, r2), inf
	}
	if disc < 0 {
		// Cannot happen for the point estimate b/a lies inside; guard against rounding.
		r := b / a
		return r, r
	}
	sq := math.Sqrt(disc)
	r1, r2 := (-qb-sq)/(2*qa), (-qb+sq)/(2*qa)
	return math.Max(0, r1), math.Max(0, r2)
}

// Within reports whether the comparison shows the rates within a fraction x of each other:
// the ratio's interval lies inside [1 − x, 1 + x] (x = 0.1: "bounded within ±10 %"). Like
// Shown it is valid at any stopping time.
func (c Comparison) Within(x float64) bool { return c.RatioLow >= 1-x && c.RatioHigh <= 1+x }

// VerdictFor is the comparison's verdict in words, with the variants called a and b:
// "b makes fewer errors than a (p = 3.1e-5)", "no difference shown (p = 0.41)".
func (c Comparison) VerdictFor(a, b string) string {
	switch {
	case c.Frames == 0:
		return "no frames yet"
	case math.IsNaN(c.P):
		return "not judged"
	case c.Frames < MinPairedFrames && !c.Same && !c.Shown:
		return fmt.Sprintf("not judged yet (%d of %d frames)", c.Frames, MinPairedFrames)
	case c.Same:
		return fmt.Sprintf("no difference shown: the same number of errors in each of the %d frames", c.Frames)
	case c.Shown && c.Diff < 0:
		return fmt.Sprintf("%s makes fewer errors than %s (%s)", b, a, FormatP(c.P))
	case c.Shown && c.Diff > 0:
		return fmt.Sprintf("%s makes more errors than %s (%s)", b, a, FormatP(c.P))
	}
	return fmt.Sprintf("no difference shown (%s)", FormatP(c.P))
}

// FormatP prints a p-value a person can read: "p = 0.003", "p = 3.1e-5", "p = 2.3e-58", "p = 1",
// "p < 1e-300" for what lies below a double's normal range (including 0).
func FormatP(p float64) string {
	switch {
	case math.IsNaN(p):
		return "p not judged"
	case p < 1e-300:
		return "p < 1e-300"
	case p >= 1:
		return "p = 1"
	}
	return strings.Replace(fmt.Sprintf("p = %.2g", p), "e-0", "e-", 1)
}
