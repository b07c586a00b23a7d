package lab

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/stat/distuv"

	"tally/blocks/stats"
)

// Assessment is what a count of errors in bits says at a confidence: the estimate, the
// two-sided interval, and the one-sided upper limit at the same confidence — the figure that
// answers "is BER ≤ x shown?". tally interval prints it; tally plan's bits are the fewest for
// which it shows its BER (see BitsToClaim), so the two commands answer the lab's question
// the same way.
type Assessment struct {
	Errors     int64   `json:"errors"`
	Bits       int64   `json:"bits"`
	Confidence float64 `json:"confidence"`
	BER        float64 `json:"ber"`     // estimate
	Low        float64 `json:"ci_low"`  // two-sided interval at Confidence (one-sided at an end: see Method)
	High       float64 `json:"ci_high"` // its upper end
	Method     string  `json:"method"`  // of the two-sided interval
	// Upper is the one-sided upper confidence limit at Confidence: BER ≤ Upper with that
	// confidence (exact binomial, Clopper–Pearson's one tail; for a count stopped at its last
	// error, the inverse-sampling interval's upper end at 2·Confidence − 1).
	Upper       float64 `json:"upper"`
	UpperMethod string  `json:"upper_method"`
}

// Shows reports whether the count shows BER ≤ spec at its confidence: Upper ≤ spec.
func (a Assessment) Shows(spec float64) bool { return a.Upper <= spec }

// Assess reads a count: errors in bits at a confidence, the two-sided interval by the named
// method ("" for the default, Clopper–Pearson); stopped says the count ran until its last
// error (an error-target stop), which is inverse sampling. It refuses counts and confidences
// that have no meaningful answer (see CheckConfidence), with a plain sentence.
func Assess(errors, bits int64, confidence float64, method string, stopped bool) (Assessment, error) {
	switch {
	case bits < 1:
		return Assessment{}, fmt.Errorf("the bits counted (%d) must be at least 1", bits)
	case errors < 0:
		return Assessment{}, fmt.Errorf("the errors counted (%d) must not be negative", errors)
	case errors > bits:
		return Assessment{}, fmt.Errorf("the errors counted (%d) exceed the bits (%d)", errors, bits)
	case stopped && errors < 1:
		return Assessment{}, fmt.Errorf("a count stopped at its last error needs at least one error")
	}
	if err := CheckConfidence(confidence); err != nil {
		return Assessment{}, err
	}
	m, err := stats.MethodNamed(method)
	if err != nil {
		return Assessment{}, err
	}
	a := Assessment{Errors: errors, Bits: bits, Confidence: confidence}
	var two, one stats.Estimate
	err = guard(func() error {
		if stopped {
			if two, err = stats.InverseSampling(errors, bits, bits, errors, confidence); err != nil {
				return err
			}
			one, err = stats.InverseSampling(errors, bits, bits, errors, 2*confidence-1)
			return err
		}
		if two, err = m(errors, bits, confidence); err != nil {
			return err
		}
		one.Method = "clopper-pearson one-sided"
		one.High, err = stats.UpperLimit(errors, bits, confidence)
		return err
	})
	if err != nil {
		return Assessment{}, errNoAnswer
	}
	a.BER, a.Low, a.High, a.Method = two.Rate, two.Low, two.High, two.Method
	a.Upper, a.UpperMethod = one.High, one.Method
	if stopped {
		a.UpperMethod = two.Method + " one-sided"
	}
	for _, v := range []float64{a.BER, a.Low, a.High, a.Upper} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return Assessment{}, errNoAnswer
		}
	}
	return a, nil
}

// errNoAnswer is the plain sentence for values the numerical routines cannot serve.
var errNoAnswer = errors.New("no reliable answer can be computed for these values")

// Confidence bounds: at 50 % or below a claim says no more than a coin toss; above 1 − 1e-9 the
// typed confidence is no longer carried by a float64 closely enough (1 − C is known to
// 1e-16 absolute) for the answer to hold to 1e-6.
const (
	MinConfidence = 0.5
	MaxConfidence = 1 - 1e-9
)

// CheckConfidence refuses a confidence outside (MinConfidence, MaxConfidence] with a plain
// sentence.
func CheckConfidence(c float64) error {
	switch {
	case !(c > 0 && c < 1):
		return fmt.Errorf("-confidence %v must lie strictly between 0 and 1 (0.95 is 95 %%)", c)
	case c <= MinConfidence:
		return fmt.Errorf("-confidence %v is not above 50 %%: such a claim says no more than a coin toss (give more than 0.5, at most 0.999999999)", c)
	case c > MaxConfidence:
		return fmt.Errorf("-confidence %v is too close to 1 for the answer to be computed reliably (give at most 0.999999999)", c)
	}
	return nil
}

// BitsToClaim is the fewest bits in which at most k errors show BER ≤ ber at the given
// confidence: the smallest n with P(Bin(n, ber) ≤ k) ≤ 1 − confidence, that is whose
// one-sided upper limit (Assessment.Upper, stats.UpperLimit) is at most ber — so tally
// interval on k errors in that many bits says the spec is met, and on one bit fewer that it
// is not. It lies just under the Poisson form χ²(confidence; 2(k+1)) / (2·ber) (about 3/ber at
// 95 % with no errors), which it returns past 2⁶² bits, where the two agree to far below a
// bit in 10¹⁵. It is +Inf when even that overflows.
func BitsToClaim(ber, confidence float64, k int64) float64 {
	var poisson float64
	if err := guard(func() error {
		poisson = math.Ceil(distuv.ChiSquared{K: 2 * float64(k+1)}.Quantile(confidence) / (2 * ber))
		return nil
	}); err != nil || math.IsNaN(poisson) {
		return math.Inf(1)
	}
	if poisson > maxCount || poisson < float64(k)+1 {
		return poisson
	}
	shows := func(n int64) bool {
		u, err := stats.UpperLimit(k, n, confidence)
		return err == nil && u <= ber
	}
	// The binomial needs fewer bits than the Poisson form (Anderson and Samuels, "Some
	// inequalities among binomial and Poisson probabilities", 1967; from memory): search
	// below it, widening the bracket until it holds.
	hi := int64(poisson)
	for !shows(hi) && hi < maxCount/2 {
		hi *= 2
	}
	lo := hi - int64(math.Max(16, float64(hi)*ber*float64(k+2)+float64(k)+16))
	for lo > k && shows(lo) {
		lo -= hi - lo
	}
	lo = max(lo, k)
	for hi-lo > 1 { // shows(hi), and not shows(lo) (or lo = k, which never shows with k errors)
		m := lo + (hi-lo)/2
		if shows(m) {
			hi = m
		} else {
			lo = m
		}
	}
	return float64(hi)
}

// ConfidenceReached is the confidence with which at most k errors in n bits show
// BER ≤ ber: P(Bin(n, ber) ≥ k+1), the reverse of BitsToClaim.
func ConfidenceReached(ber float64, k int64, n float64) float64 {
	if n > maxCount {
		return 1 - distuv.Poisson{Lambda: n * ber}.CDF(float64(k))
	}
	c, err := stats.ConfidenceBelow(k, int64(n), ber)
	if err != nil {
		return math.NaN()
	}
	return c
}
