package stats

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/stat/distuv"

	"tally/blocks/link"
)

// MinEffective is the effective sample size below which a weighted estimate is flagged as
// degenerate: so few weights carry the sum that its variance estimate cannot be trusted
// (our choice, in the range of the usual rules of thumb; common practice, no source).
const MinEffective = 50

// MinFrames is the number of frames below which a weighted estimate has no interval: the
// variance between frames needs several frames to be estimated (common practice, no source).
const MinFrames = 10

// WeightedEstimate is the estimate of a weighted tally (importance sampling or semi-analytic).
type WeightedEstimate struct {
	Estimate
	// Effective is Kish's effective sample size of the weights of the decisions in error,
	// (Σw)²/Σw² (Kish, Survey Sampling, 1965): how many equal weights would carry the same
	// information. Small means a few weights carry the sum.
	Effective float64
	// Degenerate flags an estimate whose weights have degenerated (Effective < MinEffective)
	// or that has too few frames for a variance (< MinFrames): not to be read as precise.
	Degenerate bool
}

// Weighted is the estimate of a tally summed with weights (link.Tally.Weight, see
// link.Estimator): the rate p̂ = W/n over n trials, W = Σ_f W_f over the frames, and an interval
// from the variance between frames, which holds whatever the dependence of decisions inside a
// frame (bits of one symbol share its noise and weight):
//
//	s² = (Σ W_f² − W²/F)/(F − 1),   se(p̂) = √(s²/F)/m,   m = n/F trials per frame,
//	p̂ ± t·se, t the (1+confidence)/2 quantile of Student's t with F − 1 degrees of freedom,
//	the lower limit kept ≥ 0.
//
// For importance sampling p̂ is unbiased and this is the usual normal interval from the
// weighted sample variance (Smith, Shafi and Gao, IEEE JSAC, 1997, §II); for the semi-analytic
// estimator p̂ averages exact conditional error probabilities and the interval covers the
// sampling of the data and of any random element before the noise. Method names it:
// "importance-sampling" or "semi-analytic", with "+t" for the interval. A tally with no
// trials gives rate 0 and the interval [0, 1].
func Weighted(t link.Tally, confidence float64) (WeightedEstimate, error) {
	if !(confidence > 0 && confidence < 1) {
		return WeightedEstimate{}, fmt.Errorf("confidence %v must lie strictly between 0 and 1", confidence)
	}
	if t.Trials < 0 || t.Weight < 0 || math.IsNaN(t.Weight) || math.IsInf(t.Weight, 0) {
		return WeightedEstimate{}, fmt.Errorf("weighted tally is not valid (trials %d, weight sum %v)", t.Trials, t.Weight)
	}
	name := t.Estimator.String() + "+t"
	w := WeightedEstimate{Estimate: none(name)}
	if t.Trials == 0 {
		w.Degenerate = true
		return w, nil
	}
	n, F := float64(t.Trials), float64(t.Frames)
	w.Rate = t.Weight / n
	if t.WeightSquares > 0 {
		w.Effective = t.Weight * t.Weight / t.WeightSquares
	}
	if t.Frames < MinFrames {
		w.Degenerate = true
		return w, nil
	}
	s2 := (t.FrameWeights - t.Weight*t.Weight/F) / (F - 1)
	se := math.Sqrt(math.Max(s2, 0)/F) / (n / F)
	z := distuv.StudentsT{Mu: 0, Sigma: 1, Nu: F - 1}.Quantile((1 + confidence) / 2)
	w.Low = math.Max(0, w.Rate-z*se)
	w.High = math.Min(1, w.Rate+z*se)
	w.Degenerate = w.Effective < MinEffective
	return w, nil
}

// EquivalentErrors is the number of errors a plain count would need for the relative
// standard error of the weighted tally's estimate: a count of k errors has relative standard
// error about 1/√k (Poisson), so k = (p̂/se)² with se as in Weighted. It is 0 while the
// estimate cannot be judged (fewer than MinFrames frames, no weight, degenerated weights) and
// +Inf when the frames do not vary (a semi-analytic estimate of a link without randomness
// before the noise but the data, whose frames all give the same sum).
func EquivalentErrors(t link.Tally) float64 {
	if t.Frames < MinFrames || !(t.Weight > 0) || t.WeightSquares <= 0 || t.Weight*t.Weight/t.WeightSquares < MinEffective {
		return 0
	}
	F := float64(t.Frames)
	s2 := math.Max(0, (t.FrameWeights-t.Weight*t.Weight/F)/(F-1))
	if s2 <= 1e-12*t.Weight*t.Weight/(F*F) { // rounding of equal frame sums
		return math.Inf(1)
	}
	// p̂/se = (W/n) / (√(s²/F)·F/n) = W/√(s²·F).
	return t.Weight * t.Weight / (s2 * F)
}

// PlainBits is how many bits plain counting would need to reach the precision of a weighted
// tally at its estimated rate: EquivalentErrors / p̂ (0 when either is not known).
func PlainBits(t link.Tally) float64 {
	k := EquivalentErrors(t)
	if k == 0 || math.IsInf(k, 1) || !(t.Weight > 0) {
		return 0
	}
	return k * float64(t.Trials) / t.Weight
}
