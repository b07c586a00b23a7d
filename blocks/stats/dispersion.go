package stats

import (
	"math"
	"math/bits"

	"gonum.org/v1/gonum/stat/distuv"

	"tally/blocks/link"
	"tally/blocks/rng"
)

// Dispersion is the ratio of the observed spread of errors between frames to the spread
// independent bit errors would give (the binomial index of dispersion; for a ratio estimator
// over frames it is Kish's design effect, Kish, Survey Sampling, 1965, §8.2):
//
//	D = s² / (m·p̂·(1−p̂)),  s² = (Σe_f² − (Σe_f)²/n)/(n−1),  m = trials per frame, p̂ = Σe_f/Σm.
//
// D ≈ 1 when errors are independent; D > 1 when they come in bursts (slow or block fading, cycle
// slips, decoder error events, differential detection), and then a binomial interval is too
// narrow by about √D. It returns NaN when it cannot be judged: fewer than two frames, or no
// errors, or every trial an error. Frames are taken to have the same number of trials.
func Dispersion(t link.Tally) float64 {
	n := float64(t.Frames)
	if t.Frames < 2 || t.Errors == 0 || t.Errors == t.Trials {
		return math.NaN()
	}
	m := float64(t.Trials) / n
	p := float64(t.Errors) / float64(t.Trials)
	e := float64(t.Errors)
	s2 := (float64(t.Squares) - e*e/n) / (n - 1)
	return s2 / (m * p * (1 - p))
}

// Bursty reports whether the frames' errors are shown over-dispersed at the given
// significance: BurstTest's verdict.
func Bursty(t link.Tally, significance float64) bool {
	b, _ := BurstTest(t, significance)
	return b
}

// Burst test methods, as BurstTest names them (and run.json records them).
const (
	BurstBound   = "exact conditional moments, Cantelli bound"
	BurstMC      = "exact conditional, Monte Carlo"
	BurstChi2    = "chi-square index of dispersion"
	BurstBelow   = "dispersion not above its expectation"
	BurstNoJudge = "not judged"
)

// burstWork bounds the errors a Monte Carlo burst test may place (replicates × errors).
const burstWork = 4e7

// BurstTest tests whether the frames' errors are over-dispersed — come in bursts — at the
// given significance, and names the method that decided. Its false-alarm rate is at most
// the significance for any frame size and error density, including frames that mostly hold
// no error at all, where the χ² approximation of the index-of-dispersion test (Fisher,
// Statistical Methods for Research Workers, 1925) fails: at p = 1e-6 in 1024-bit frames it
// flags about 5 % of independent counts at significance 0.001.
//
// The test conditions on what the tally holds (n frames of m trials, K errors) and uses the
// statistic S = Σ e_f² (D is a function of it). With independent errors, given K, the errors
// lie on K of the n·m trials taken at random without replacement, so S has an exact
// conditional law that depends on nothing unknown (Fisher's conditional argument; for the
// dispersion test, Cochran, Biometrics 10, 1954, §3). It is judged in three steps:
//
//  1. S at or below its conditional mean: not bursty.
//  2. Cantelli's inequality on the exact conditional mean μ and variance σ² (from the
//     factorial moments of the multivariate hypergeometric law),
//     P(S ≥ s) ≤ σ² / (σ² + (s − μ)²), valid for any law: bursty when that is at most the
//     significance. Real bursts (a handful of errors per event) are decided here at once.
//  3. Otherwise a Monte Carlo test on the same exact law: B replicates of K errors dropped at
//     random on the n·m trials, p = (1 + #{S* ≥ s})/(B + 1), which is exact at the
//     significance when it is a multiple of 1/(B+1) (Barnard, J. R. Stat. Soc. B 25, 1963;
//     Besag and Clifford, "Sequential Monte Carlo p-values", Biometrika 78, 1991, whose
//     early stop is used: the replicates stop once enough of them reach s that the test
//     cannot reject). B + 1 is 4/significance, up to 20 000. The replicates draw from a
//     stream keyed by the counts, so the verdict is the same on every run.
//
// Past 4·10⁷ placed errors (B × K) the Monte Carlo step is replaced by the χ² test when the
// frames hold at least 5 errors on average, where it is accurate (Cochran 1954); otherwise
// only the Cantelli step can flag. Fewer than two frames, no errors, every trial an error,
// frames of one trial, or trials that do not split evenly into the frames: not judged.
func BurstTest(t link.Tally, significance float64) (bursty bool, method string) {
	n, k, nt := t.Frames, t.Errors, t.Trials
	if n < 2 || k == 0 || k == nt || nt%n != 0 || nt/n < 2 || !(significance > 0 && significance < 1) {
		return false, BurstNoJudge
	}
	m := nt / n
	mu, v := squaresMoments(n, m, k)
	s := float64(t.Squares)
	if s <= mu {
		return false, BurstBelow
	}
	if v > 0 && v/(v+(s-mu)*(s-mu)) <= significance {
		return true, BurstBound
	}
	reps := int64(math.Min(math.Ceil(4/significance), 20000)) - 1
	if float64(reps)*float64(k) > burstWork {
		if float64(k)/float64(n) >= 5 {
			df := float64(n - 1)
			return distuv.ChiSquared{K: df}.Survival(df*Dispersion(t)) < significance, BurstChi2
		}
		return false, BurstNoJudge
	}
	// Reject when (g+1)/(reps+1) ≤ significance: at most gmax replicates may reach s.
	gmax := int64(math.Floor(significance*float64(reps+1))) - 1
	if gmax < 0 {
		return false, BurstMC
	}
	r := rng.New(uint64(n)*0x9e3779b97f4a7c15 ^ uint64(k)*0xc2b2ae3d27d4eb4f ^ uint64(t.Squares)*0x165667b19e3779f9 ^ uint64(nt))
	var g int64
	h := make([]int64, 2, 16)
	for range reps {
		if placedSquares(r, h, n, m, k, t.Squares) >= t.Squares {
			if g++; g > gmax {
				return false, BurstMC
			}
		}
	}
	return true, BurstMC
}

// placedSquares drops k errors one by one on the free trials of n frames of m trials, each
// free trial equally likely (sampling without replacement), and returns Σ e_f², stopping
// early once it reaches stop. h is scratch: h[c] counts the frames holding c errors.
func placedSquares(r *rng.Stream, h []int64, n, m, k, stop int64) int64 {
	h = h[:2]
	h[0], h[1] = n, 0
	free := n * m
	var sq int64
	for range k {
		// A free trial at random; frames holding c errors hold h[c]·(m−c) free trials.
		hi, _ := bits.Mul64(r.Uint64(), uint64(free))
		pos := int64(hi)
		c := 0
		for ; c < len(h); c++ {
			w := h[c] * (m - int64(c))
			if pos < w {
				break
			}
			pos -= w
		}
		h[c]--
		if c+1 == len(h) {
			h = append(h, 0)
		}
		h[c+1]++
		sq += int64(2*c + 1)
		free--
		if sq >= stop {
			break
		}
	}
	return sq
}

// squaresMoments is the exact mean and variance of S = Σ e_f² when k errors lie on k of the
// n·m trials of n frames of m taken at random (multivariate hypergeometric), from the
// factorial moments E[(e_i)_r (e_j)_s] = (k)_(r+s) (m)_r (m)_s / (N)_(r+s), i ≠ j, and
// e² = (e)₂ + e, e⁴ = (e)₄ + 6(e)₃ + 7(e)₂ + e (Stirling numbers of the second kind).
func squaresMoments(n, m, k int64) (mean, variance float64) {
	nn, mf, kf := float64(n*m), float64(m), float64(k)
	var p [5]float64 // p[r] = (k)_r / (N)_r
	p[0] = 1
	for r := 1; r <= 4; r++ {
		p[r] = p[r-1] * math.Max(0, kf-float64(r-1)) / (nn - float64(r-1))
	}
	fm := func(r int) float64 { // (m)_r
		v := 1.0
		for i := range r {
			v *= mf - float64(i)
		}
		return v
	}
	one := func(r int) float64 { return p[r] * fm(r) }              // E (e_i)_r
	two := func(r, s int) float64 { return p[r+s] * fm(r) * fm(s) } // E (e_i)_r (e_j)_s
	nf := float64(n)
	e2 := one(2) + one(1)
	e4 := one(4) + 6*one(3) + 7*one(2) + one(1)
	cross := two(2, 2) + two(2, 1) + two(1, 2) + two(1, 1)
	mean = nf * e2
	variance = nf*e4 + nf*(nf-1)*cross - mean*mean
	return mean, variance
}

// Clustered widens an estimate for bursty errors by Kish's effective sample size: the interval
// of the same method for k/D errors in n/D trials, when D > 1 (it never narrows one).
func Clustered(t link.Tally, e Estimate, confidence float64, method string) (Estimate, error) {
	d := Dispersion(t)
	if math.IsNaN(d) || d <= 1 {
		return e, nil
	}
	k := int64(math.Round(float64(t.Errors) / d))
	n := int64(math.Round(float64(t.Trials) / d))
	if n < 1 {
		n = 1
	}
	w, err := ForPoint(link.Tally{Trials: n, Errors: min(k, n)}, confidence, method, 0)
	if err != nil {
		return e, err
	}
	e.Low, e.High = math.Min(e.Low, w.Low), math.Max(e.High, w.High)
	e.Method += "+clustered"
	return e, nil
}
