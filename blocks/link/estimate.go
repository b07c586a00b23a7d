package link

import (
	"fmt"
	"strings"
)

// Estimator says how a link's bit-error rate is estimated.
//
//   - Count: plain Monte Carlo, errors counted (the default).
//   - Importance: importance sampling. The Gaussian noise block draws its noise from a biased
//     density and reports each symbol's likelihood ratio (Frame.Weight); an error counts with
//     its weight, and Σw/n is unbiased for the BER (Jeruchim, "Techniques for estimating the
//     bit error rate in the simulation of digital communication systems", IEEE JSAC, 1984;
//     Smith, Shafi and Gao, "Quick simulation: a review of importance sampling techniques in
//     communications systems", IEEE JSAC, 1997). Every block after the noise must act on each
//     sample alone (a rotation, a slicer, a detector): then a decision depends on its own
//     symbol's noise only and its weight is that symbol's ratio.
//   - SemiAnalytic: the quasi-analytical method (Jeruchim, Balaban and Shanmugan, Simulation
//     of Communication Systems, 2nd ed., 2000, the quasi-analytical estimation of BER). The
//     noise block adds no noise and reports its variance (Frame.NoiseVar); linear blocks
//     after it carry the variance to the detector, which reports for each noise-free decision
//     the Gaussian tail probability that the noise flips it (Frame.Flip); the link sums those
//     probabilities. Exact when the Gaussian noise is the last random element and the
//     receiver after it is linear up to a detector with known boundaries.
//
// Unestimated marks a tap the link's estimator does not estimate (the frame tap: a frame's
// weight would be the product of all its symbols' ratios, which degenerates).
type Estimator uint8

// The estimators.
const (
	Count Estimator = iota
	Importance
	SemiAnalytic
	Unestimated
)

// String is the estimator's name as run.json records it.
func (e Estimator) String() string {
	switch e {
	case Importance:
		return "importance-sampling"
	case SemiAnalytic:
		return "semi-analytic"
	case Unestimated:
		return "not-estimated"
	}
	return "count"
}

// EstimatorNamed reads "count", "importance" (or "importance-sampling") and "semi-analytic"
// (or "semianalytic"); case and surrounding space are ignored.
func EstimatorNamed(name string) (Estimator, error) {
	switch strings.ToLower(strings.TrimSpace(name)) {
	case "", "count":
		return Count, nil
	case "importance", "importance-sampling":
		return Importance, nil
	case "semi-analytic", "semianalytic", "quasi-analytic":
		return SemiAnalytic, nil
	}
	return Count, fmt.Errorf("unknown estimator %q (want count, importance or semi-analytic)", name)
}

// Kind is what a block tells the estimators about itself (the Nature interface). A block that
// declares nothing is Undeclared: accepted before the noise, refused after it.
type Kind uint8

// The kinds of block the estimators know.
const (
	Undeclared Kind = iota
	// GaussianNoise is the white Gaussian noise block the estimators work on (one per link).
	GaussianNoise
	// PerSample acts on each sample alone by a fixed rule (a phase rotation, a gain): fine
	// after the noise for importance sampling; also linear (noise variance unchanged) when it
	// implements LinearAfterNoise.
	PerSample
	// LinearFilter is a fixed linear filter or a resampler: fine after the noise for the
	// semi-analytic estimator only (a decision then depends on many samples' noise).
	LinearFilter
	// Detector decides symbols; it implements EstimatorCheck to say which estimators it serves.
	Detector
	// NonGaussian noise (impulses): the error rate is not a Gaussian tail. Refused anywhere.
	NonGaussian
	// SymbolFading draws a channel gain per symbol: the errors come from the fades, which
	// neither estimator biases. Refused anywhere.
	SymbolFading
	// Adaptive receivers (trained equalisers, carrier and timing recovery, gain control)
	// learn from the noisy signal. Refused after the noise.
	Adaptive
	// Decoder decides on many noisy symbols at once. Refused after the noise.
	Decoder
)

// Nature is implemented by blocks that declare their Kind to the estimators.
type Nature interface{ Nature() Kind }

// LinearAfterNoise is implemented by PerSample blocks that are linear and leave the noise
// variance per real dimension unchanged (a rotation): the semi-analytic estimator accepts them.
type LinearAfterNoise interface{ NoiseUnchanged() }

// EstimatorCheck is implemented by blocks that accept an estimator only in some settings (a
// detector: which schemes and options it can serve). The error says why not.
type EstimatorCheck interface{ CheckEstimator(e Estimator) error }

// KindOf is the block's declared Kind, or Undeclared.
func KindOf(b Block) Kind {
	if n, ok := b.(Nature); ok {
		return n.Nature()
	}
	return Undeclared
}

// Estimate sets how the link estimates its BER: "count" (plain Monte Carlo, the default),
// "importance" or "semi-analytic" (see Estimator). A link whose blocks break the estimator's
// assumptions stops the script at this line with a message naming the block; plain counting
// always works. It returns the link.
func (l *Link) Estimate(method string) *Link {
	e, err := EstimatorNamed(method)
	if err == nil {
		err = l.CheckEstimator(e)
	}
	if err != nil {
		panic(fmt.Errorf("link.Estimate: %w", err))
	}
	l.est = e
	return l
}

// Estimator is the link's estimator (Count unless Estimate set another).
func (l *Link) Estimator() Estimator { return l.est }

// CheckEstimator reports whether estimator e can serve this link, and if not, which block
// breaks its assumptions and why.
func (l *Link) CheckEstimator(e Estimator) error {
	if e == Count {
		return nil
	}
	noise := -1
	for i, b := range l.blocks {
		switch KindOf(b) {
		case GaussianNoise:
			if noise >= 0 {
				return fmt.Errorf("%s is a second Gaussian noise block (after %s): the %s estimator works on one; combine them into one level", NameOf(b), NameOf(l.blocks[noise]), e)
			}
			noise = i
		case NonGaussian:
			return fmt.Errorf("%s adds non-Gaussian noise: its error rate is not a Gaussian tail; run plain Monte Carlo", NameOf(b))
		case SymbolFading:
			return fmt.Errorf("%s draws its fading per symbol: the errors come from the fades, which the %s estimator does not weigh; run plain Monte Carlo", NameOf(b), e)
		}
	}
	if noise < 0 {
		return fmt.Errorf("the link has no Gaussian noise block (channel.AWGN): the %s estimator works on its noise", e)
	}
	detector := false
	for _, b := range l.blocks[noise+1:] {
		k := KindOf(b)
		if c, ok := b.(EstimatorCheck); ok {
			if err := c.CheckEstimator(e); err != nil {
				return fmt.Errorf("%s: %w", NameOf(b), err)
			}
		}
		if detector && k != Undeclared {
			return fmt.Errorf("%s comes after the detector: the estimators weigh the detector's decisions", NameOf(b))
		}
		switch k {
		case Detector:
			detector = true
		case PerSample:
			if _, ok := b.(LinearAfterNoise); e == SemiAnalytic && !ok {
				return fmt.Errorf("%s after the noise is not linear: the semi-analytic estimator needs a linear receiver up to the detector (importance sampling accepts it)", NameOf(b))
			}
		case LinearFilter:
			if e == Importance {
				return fmt.Errorf("%s after the noise has memory: importance sampling weighs one symbol's noise per decision; use the semi-analytic estimator, which is exact for a linear receiver", NameOf(b))
			}
		case Adaptive:
			return fmt.Errorf("%s after the noise adapts to the noisy signal: neither estimator's assumptions hold; run plain Monte Carlo", NameOf(b))
		case Decoder:
			return fmt.Errorf("%s after the noise decides on many symbols at once: neither estimator can weigh it; run plain Monte Carlo", NameOf(b))
		default:
			if !detector {
				return fmt.Errorf("%s after the noise does not declare itself memoryless or linear: the %s estimator cannot vouch for it; run plain Monte Carlo", NameOf(b), e)
			}
			// A tap of the script's own after the detector (reading decisions) is harmless.
		}
	}
	if !detector {
		return fmt.Errorf("no detector after %s: the estimators weigh a detector's decisions", NameOf(l.blocks[noise]))
	}
	if l.coded {
		return fmt.Errorf("the link is coded: the estimators weigh the detector's decisions, not a decoder's; run plain Monte Carlo")
	}
	return nil
}

// weigh adds the frame's weighted error indicators to the BER tap and marks the frame tap as
// not estimated.
func (l *Link) weigh(f *Frame, out []byte, ber, fer *Tally) error {
	ber.Estimator, fer.Estimator = l.est, Unestimated
	var s, s2 float64
	switch l.est {
	case Importance:
		bps := f.BitsPerSymbol
		if bps < 1 || len(f.Weight)*bps != len(out) {
			return fmt.Errorf("link: importance sampling has %d weights for %d decided bits (is the noise block a channel.AWGN at one sample per symbol?)", len(f.Weight), len(out))
		}
		for i, b := range f.Bits {
			if b != out[i] {
				w := f.Weight[i/bps]
				s += w
				s2 += w * w
			}
		}
	case SemiAnalytic:
		if len(f.Flip) != len(out) {
			return fmt.Errorf("link: the detector gave %d flip probabilities for %d decided bits (semi-analytic estimation)", len(f.Flip), len(out))
		}
		for i, b := range f.Bits {
			p := f.Flip[i]
			if b != out[i] {
				p = 1 - p
			}
			s += p
			s2 += p * p
		}
	}
	ber.Weight += s
	ber.WeightSquares += s2
	return nil
}
