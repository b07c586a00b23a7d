package stats

import (
	"fmt"
	"math"
)

// InverseMethod is the Method of an estimate made by InverseSampling from the frame count
// alone: always for frames of one trial, where it is exact and nothing better exists.
const InverseMethod = "negative-binomial"

// StagewiseMethod is the Method of an estimate made by InverseSampling with frames of more
// than one trial, whose interval also uses the errors counted past the target (see there).
const StagewiseMethod = "stagewise"

// InverseSampling is the estimate for a count ended by an error-count rule: trials are run
// in frames of equal size until the first frame boundary with at least r errors; k errors
// were then counted in n trials, in frames frames (frame size L = n/frames; L = 1 is the
// rule judged after every trial).
//
// Stopping at a fixed number of errors is inverse binomial sampling (Haldane, "On a method
// of estimating frequencies", Biometrika 33, 1945): the trials are random and the errors
// (nearly) fixed, so the fixed-n estimate k/n is biased upward, by about 1/(r−1) of the rate
// (11 % at 10 errors), and the fixed-n limits are not the right ones.
//
// Frames of one trial (Method "negative-binomial"): the interval inverts the two tails of
// the number of frames F, as Clopper and Pearson (Biometrika 26, 1934) do for the binomial,
// through the identity between a negative-binomial and a binomial tail,
// P(F ≤ f) = P(Bin(fL, p) ≥ r) (for L = 1 see e.g. Johnson, Kemp and Kotz, Univariate
// Discrete Distributions, 3rd ed., 2005, ch. 5), which makes each limit a Beta quantile
// B⁻¹(q; a, b):
//
//	low  = B⁻¹(α/2; r, n−r+1)        P(F ≤ f | low)  = α/2
//	high = B⁻¹(1−α/2; r, n−L−r+1)    P(F ≥ f | high) = α/2   (high = 1 when n−L < r)
//
// With L = 1 these are the exact negative-binomial limits B⁻¹(α/2; r, n−r+1) and
// B⁻¹(1−α/2; r, n−r): the lower one is Clopper–Pearson's, the upper one tighter.
//
// Frames of L > 1 trials (Method "stagewise"): F alone wastes the k − r errors past the
// target, which coarse frames make many (one frame of 2048 bits at p = 0.077 ends with
// about 158 errors for r = 100, and F = 1 gives high = 1 whatever k is). The interval then
// inverts the stage-wise ordering of the outcomes (F, k) — stopping earlier is more extreme
// towards a high p, and at the same F more errors are — the ordering used for confidence
// intervals after multistage and group-sequential tests (Jennison and Turnbull, Technometrics
// 25, 1983, for the binomial; Tsiatis, Rosner and Mehta, Biometrics 40, 1984; cited from
// memory). With S_t the errors among the first t trials and m = n − L, the two tails are
//
//	P((F, K) at least as high as (f, k)) = P(F < f) + P(F = f, K ≥ k) = P(S_m ≥ r  or  S_n ≥ k)
//	P((F, K) at least as low as (f, k))  = P(F > f) + P(F = f, K ≤ k) = P(S_m ≤ r−1 and S_n ≤ k)
//
// (the unions simplify because k ≥ r). The first is the probability of an event increasing
// in the trial outcomes, the second of a decreasing one, so by coupling the first grows and
// the second falls with p, and
//
//	low:  P(S_m ≥ r or S_n ≥ k | low)   = α/2
//	high: P(S_m ≤ r−1, S_n ≤ k | high)  = α/2
//
// is an exact interval (coverage ≥ 1 − α for every p) by the argument of Clopper and
// Pearson. Both events lie inside the ones the frame count alone uses ({S_n ≥ r} and
// {S_m ≤ r−1}), so these limits always lie within the negative-binomial ones above; with
// L = 1 they equal them (k = r), and with one frame (m = 0) they are Clopper–Pearson's on
// (k, n). The tails are summed over the j ≤ r−1 errors of the first m trials,
// P(S_m = j)·P(Bin(L, p) ≷ k−j), over the j within 12 standard deviations of mp (beyond that
// the terms are below 1e-30); limits are found by regula falsi on logit p. Should that window
// exceed 50 000 terms (r in the millions), the negative-binomial limits are kept: they
// contain the stage-wise ones, so they are still valid, only wider.
//
// The estimate is the unbiased one given (F, k): the expected share of errors among the n−L
// trials before the last frame, E[j]/(n−L), over the j ≤ r−1 errors those trials may hold
// (all arrangements of the k errors are equally likely given the counts). For L = 1 it is
// Haldane's (r−1)/(n−1); with a single frame it is k/n.
func InverseSampling(k, n, frames, r int64, confidence float64) (e Estimate, err error) {
	defer numeric(&e, &err)
	if err := checkCount(k, n, confidence); err != nil {
		return Estimate{}, err
	}
	switch {
	case r < 1:
		return Estimate{}, fmt.Errorf("error target %d must be at least 1", r)
	case k < r:
		return Estimate{}, fmt.Errorf("errors %d fall short of the target %d the count stopped at", k, r)
	case frames < 1 || frames > n || n%frames != 0:
		return Estimate{}, fmt.Errorf("%d trials do not split into %d equal frames", n, frames)
	}
	L := n / frames
	m := n - L // trials before the last frame
	// j errors before the last frame: j ≤ r−1 (else the count would have stopped earlier),
	// j ≤ m, and k−j ≤ L.
	jlo, jhi := max(0, k-L), min(r-1, m)
	if jlo > jhi {
		return Estimate{}, fmt.Errorf("%d errors in %d trials (%d frames) cannot have stopped at the first frame with %d errors", k, n, frames, r)
	}
	alpha := 1 - confidence
	rf, nf, mf := float64(r), float64(n), float64(m)
	e = Estimate{High: 1, Method: InverseMethod}
	e.Low = clamp(betaQuantile(alpha/2, rf, nf-rf+1))
	if m >= r {
		e.High = clamp(betaQuantile(1-alpha/2, rf, mf-rf+1))
	}
	if L > 1 {
		if low, high, ok := stagewise(k, m, L, r, alpha/2, e.Low, e.High); ok {
			e.Low, e.High, e.Method = low, high, StagewiseMethod
		}
	}
	if m == 0 {
		e.Rate = float64(k) / nf
		return e, nil
	}
	// E[j] under the weights w(j) = C(m, j)·C(L, k−j), in logs from w(jlo) by the ratio
	// w(j+1)/w(j) = (m−j)/(j+1) · (k−j)/(L−k+j+1), and summed against the largest term.
	step := func(j int64) float64 {
		return math.Log(float64(m-j)/float64(j+1)) + math.Log(float64(k-j)/float64(L-k+j+1))
	}
	top, lw := 0.0, 0.0
	for j := jlo; j < jhi; j++ {
		lw += step(j)
		top = math.Max(top, lw)
	}
	var sw, sj float64
	lw = 0
	for j := jlo; j <= jhi; j++ {
		w := math.Exp(lw - top)
		sw += w
		sj += float64(j) * w
		if j < jhi {
			lw += step(j)
		}
	}
	e.Rate = sj / sw / mf
	return e, nil
}

// stageWindow caps the terms of a stage-wise tail sum; past it InverseSampling keeps the
// (wider) negative-binomial limits.
const stageWindow = 50000

// stagewise is the stage-wise interval of InverseSampling for k errors, m trials before the
// last frame of L, target r, each tail cut at q = α/2, searched within the negative-binomial
// limits [nbLow, nbHigh] that contain it. ok is false when a tail sum would be too long.
func stagewise(k, m, L, r int64, q, nbLow, nbHigh float64) (low, high float64, ok bool) {
	if m == 0 { // one frame: Clopper–Pearson on (k, L)
		kf, lf := float64(k), float64(L)
		low, high = clamp(betaQuantile(q, kf, lf-kf+1)), 1.0
		if k < L {
			high = clamp(betaQuantile(1-q, kf+1, lf-kf))
		}
		return low, high, true
	}
	ok = true
	upper := func(p float64) float64 { // P(S_m ≥ r or S_n ≥ k)
		s, t, good := stageSum(k, m, L, r, p, true)
		ok = ok && good
		return s + t
	}
	lower := func(p float64) float64 { // P(S_m ≤ r−1, S_n ≤ k)
		s, _, good := stageSum(k, m, L, r, p, false)
		ok = ok && good
		return s
	}
	low = rootLogit(nbLow, nbHigh, true, func(p float64) float64 { return upper(p) - q })
	high = rootLogit(low, nbHigh, false, func(p float64) float64 { return lower(p) - q })
	return low, high, ok
}

// rootLogit finds, between lo and hi (0 < lo ≤ hi ≤ 1), the p where g (monotone) crosses
// zero, by the Illinois variant of regula falsi on logit p (1 stands for logit 36, where
// 1−p is still above zero), which takes about ten evaluations of g where bisection takes
// forty; up says g rises with p. Without a sign change the nearer end is the root.
func rootLogit(lo, hi float64, up bool, g func(p float64) float64) float64 {
	logit := func(p float64) float64 { return math.Log(p) - math.Log1p(-p) }
	expit := func(x float64) float64 { return 1 / (1 + math.Exp(-x)) }
	a, b := logit(lo), 36.0
	if hi < 1 {
		b = math.Min(b, logit(hi))
	}
	ga, gb := g(expit(a)), g(expit(b))
	switch {
	case ga == 0:
		return lo
	case gb == 0:
		return hi
	case ga*gb > 0 && (ga < 0) == up:
		return hi
	case ga*gb > 0:
		return lo
	}
	side := 0
	for range 200 {
		if b-a < 1e-10 {
			break
		}
		x := (a*gb - b*ga) / (gb - ga)
		if !(x > a && x < b) || b-a > 8 {
			x = (a + b) / 2 // bisect while the bracket is wide in logit
		}
		gx := g(expit(x))
		switch {
		case gx == 0:
			return clamp(expit(x))
		case gx*ga > 0:
			a, ga = x, gx
			if side == -1 {
				gb /= 2
			}
			side = -1
		default:
			b, gb = x, gx
			if side == 1 {
				ga /= 2
			}
			side = 1
		}
	}
	return clamp(expit((a + b) / 2))
}

// stageSum is, for the errors S_m of the first m trials and X ~ Bin(L, p) of the last frame,
//
//	upper: s = Σ_{j ≤ r−1} P(S_m = j)·P(X ≥ k−j),  t = P(S_m ≥ r)
//	lower: s = Σ_{j ≤ r−1} P(S_m = j)·P(X ≤ k−j)
//
// over the j within 12 standard deviations (+12) of mp; good is false past stageWindow terms.
func stageSum(k, m, L, r int64, p float64, upper bool) (s, t float64, good bool) {
	mf := float64(m)
	if upper && m >= r {
		t = betaTail(p, float64(r), mf-float64(r)+1, false) // P(Beta(r, m−r+1) ≤ p)
	}
	mu := mf * p
	w := 12*math.Sqrt(mu*(1-p)) + 12
	a := max(0, int64(math.Max(0, math.Floor(mu-w))))
	b := min(r-1, m, int64(math.Min(float64(r), math.Ceil(mu+w))))
	if upper {
		a = max(a, k-L) // P(X ≥ k−j) = 0 for k−j > L
	}
	if a > b {
		return 0, t, true
	}
	if !upper && k-L >= b { // P(X ≤ k−j) = 1 throughout
		return betaTail(p, float64(b+1), mf-float64(b), true), t, true // P(S_m ≤ b)
	}
	if b-a+1 > stageWindow {
		return 0, t, false
	}
	// x = k−j runs from k−b up to k−a; the tail of X is carried from its small end:
	// P(X ≥ x) from x = k−a down, P(X ≤ x) from x = k−b up, one pmf step at a time.
	lp, lq := math.Log(p), math.Log1p(-p)
	lf := float64(L)
	xpmf := func(x int64) float64 { // log P(X = x), −Inf outside 0..L
		if x < 0 || x > L {
			return math.Inf(-1)
		}
		return logBinomPMF(lf, float64(x), p, lp, lq)
	}
	sm := logBinomPMF(mf, float64(a), p, lp, lq) // log P(S_m = j), from j = a up
	if upper {
		// Walk j up from a (x down from k−a), adding P(X = x) to the tail.
		x := k - a
		tail := 0.0
		if x <= L {
			tail = binomUpper(L, x, p)
		}
		lx := xpmf(x - 1)
		for j := a; j <= b; j++ {
			s += math.Exp(sm) * tail
			if j < b {
				sm += math.Log(float64(m-j)/float64(j+1)) + lp - lq
				// x → x−1: tail gains P(X = x−1).
				tail += math.Exp(lx)
				x--
				if x-1 >= 0 && x-1 < L {
					lx += math.Log(float64(x)/float64(L-x+1)) + lq - lp // P(X=x−1)/P(X=x)
				} else {
					lx = xpmf(x - 1)
				}
			}
		}
		return s, t, true
	}
	// lower: P(X ≤ k−j) = 1 while k−j ≥ L; the block j ≤ k−L below a is covered by the
	// window (its terms past a are tiny), so start at a' = max(a, k−L+1) and add P(S_m in
	// [a, a'−1]) as is.
	a2 := max(a, k-L+1)
	for j := a; j < a2; j++ {
		s += math.Exp(sm)
		sm += math.Log(float64(m-j)/float64(j+1)) + lp - lq
	}
	// Tail P(X ≤ x) carried from x = k−b up; walk j down from b, so recompute the pmf of
	// S_m at b and step down.
	x := k - b
	tail := binomLower(L, x, p)
	sb := logBinomPMF(mf, float64(b), p, lp, lq)
	lx := xpmf(x + 1)
	for j := b; j >= a2; j-- {
		s += math.Exp(sb) * tail
		if j > a2 {
			sb += math.Log(float64(j)/float64(m-j+1)) + lq - lp // P(S_m=j−1)/P(S_m=j)
			tail += math.Exp(lx)
			x++
			if x+1 <= L {
				lx += math.Log(float64(L-x)/float64(x+1)) + lp - lq // P(X=x+1)/P(X=x)
			} else {
				lx = math.Inf(-1)
			}
		}
	}
	return math.Min(1, s), t, true
}

// binomUpper is P(Bin(n, p) ≥ x) and binomLower P(Bin(n, p) ≤ x), by the Beta identity
// P(Bin(n, p) ≥ x) = P(Beta(x, n−x+1) ≤ p).
func binomUpper(n, x int64, p float64) float64 {
	switch {
	case x <= 0:
		return 1
	case x > n:
		return 0
	}
	return betaTail(p, float64(x), float64(n-x+1), false)
}

func binomLower(n, x int64, p float64) float64 {
	switch {
	case x < 0:
		return 0
	case x >= n:
		return 1
	}
	return betaTail(p, float64(x+1), float64(n-x), true)
}

// logBinomPMF is ln P(Bin(n, p) = x) for 0 < p < 1 (lp = ln p, lq = ln(1−p)), by Loader's
// saddle-point form ("Fast and accurate computation of binomial probabilities", 2000, as
// in R's dbinom), accurate for n up to 2⁶² where differences of ln Γ would not be.
func logBinomPMF(n, x, p, lp, lq float64) float64 {
	switch {
	case x == 0:
		return n * lq
	case x == n:
		return n * lp
	}
	lc := stirlerr(n) - stirlerr(x) - stirlerr(n-x) - bd0(x, n*p) - bd0(n-x, n*(1-p))
	return lc - 0.5*(math.Log(2*math.Pi)+math.Log(x)+math.Log1p(-x/n))
}

// stirlerr is ln(n!) − ln(√(2πn)·(n/e)ⁿ) (Loader 2000).
func stirlerr(n float64) float64 {
	if n <= 15 {
		g, _ := math.Lgamma(n + 1)
		return g - (n+0.5)*math.Log(n) + n - 0.5*math.Log(2*math.Pi)
	}
	const s0, s1, s2, s3, s4 = 1.0 / 12, 1.0 / 360, 1.0 / 1260, 1.0 / 1680, 1.0 / 1188
	nn := n * n
	switch {
	case n > 500:
		return (s0 - s1/nn) / n
	case n > 80:
		return (s0 - (s1-s2/nn)/nn) / n
	case n > 35:
		return (s0 - (s1-(s2-s3/nn)/nn)/nn) / n
	}
	return (s0 - (s1-(s2-(s3-s4/nn)/nn)/nn)/nn) / n
}

// bd0 is x·ln(x/np) + np − x, by its series when x is near np (Loader 2000).
func bd0(x, np float64) float64 {
	if math.Abs(x-np) < 0.1*(x+np) {
		v := (x - np) / (x + np)
		s := (x - np) * v
		ej := 2 * x * v
		v *= v
		for j := 1; j < 1000; j++ {
			ej *= v
			s1 := s + ej/float64(2*j+1)
			if s1 == s {
				return s1
			}
			s = s1
		}
		return s
	}
	return x*math.Log(x/np) + np - x
}
