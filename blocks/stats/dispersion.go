package stats

import (
	"math"

	"gonum.org/v1/gonum/stat/distuv"

	"tally/blocks/link"
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

// Bursty reports whether the frames' errors are over-dispersed at the given significance: the
// index-of-dispersion test, (n−1)·D against the upper tail of χ² with n−1 degrees of freedom
// (Fisher, Statistical Methods for Research Workers, 1925; Cochran, Biometrics, 1954).
func Bursty(t link.Tally, significance float64) bool {
	d := Dispersion(t)
	if math.IsNaN(d) {
		return false
	}
	df := float64(t.Frames - 1)
	return distuv.ChiSquared{K: df}.Survival(df*d) < significance
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
