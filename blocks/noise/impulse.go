package noise

import (
	"errors"
	"fmt"
	"math"

	"tally/blocks/channel"
	"tally/blocks/link"
	"tally/blocks/rng"
)

// ImpulseNoise is Bernoulli–Gaussian impulse noise, the two-state model of Ghosh, "Analysis
// of the effect of impulse noise on multicarrier and single carrier QAM systems", IEEE Trans.
// Commun., 1996: every sample carries circular complex Gaussian background noise of variance σ_g², and with
// probability P an impulse adds independent circular complex Gaussian noise of variance
// R·σ_g². The total variance is σ_g²·(1 + P·R) = N0, hence
//
//	σ_g² = N0/(1 + P·R),   impulse variance R·N0/(1 + P·R).
//
// P = 0 (or R = 0) is the AWGN channel.
type ImpulseNoise struct {
	Level channel.WhiteNoise // the noise level, set like channel.AWGN's
	P     float64            // probability of an impulse per sample, 0 ≤ P ≤ 1
	Ratio float64            // R, impulse-to-background power ratio (linear, ≥ 0)
}

// BernoulliGaussian is impulse noise at ebn0 dB of Eb/N0, impulse probability p per sample and
// impulse-to-background power ratio ratio (linear).
func BernoulliGaussian(ebn0, p, ratio float64) *ImpulseNoise {
	return &ImpulseNoise{Level: channel.WhiteNoise{DB: ebn0, By: channel.EbN0, Block: "noise.BernoulliGaussian"}, P: p, Ratio: ratio}
}

// By says which ratio the level states (channel.EbN0, channel.EsN0 or channel.SNR).
func (c *ImpulseNoise) By(l channel.Level) *ImpulseNoise { c.Level.By = l; return c }

// Name is "noise.BernoulliGaussian".
func (c *ImpulseNoise) Name() string { return c.Level.Block }

// Err reports a bad level, probability or ratio.
func (c *ImpulseNoise) Err() error {
	if err := c.Level.Err(); err != nil {
		return err
	}
	if !(c.P >= 0 && c.P <= 1) {
		return fmt.Errorf("%s: impulse probability %v must lie in [0, 1]", c.Name(), c.P)
	}
	if !finite(c.Ratio) || c.Ratio < 0 {
		return fmt.Errorf("%s: impulse-to-background ratio %v must be a finite number ≥ 0", c.Name(), c.Ratio)
	}
	return nil
}

// Process adds the noise and sets f.N0.
func (c *ImpulseNoise) Process(f *link.Frame, r *rng.Stream) error {
	if c.P == 0 || c.Ratio == 0 {
		return c.Level.Process(f, r)
	}
	n0, ok := level(&c.Level, f)
	if !ok {
		return errors.New(errNoModulator)
	}
	f.MakeComplex(r)
	f.N0 = n0
	sg := math.Sqrt(n0 / (2 * (1 + c.P*c.Ratio)))
	si := sg * math.Sqrt(c.Ratio)
	g := r.Rand()
	for i := range f.Samples {
		n := complex(sg*g.NormFloat64(), sg*g.NormFloat64())
		if r.Float64() < c.P {
			n += complex(si*g.NormFloat64(), si*g.NormFloat64())
		}
		f.Samples[i] += n
	}
	return nil
}

// Nature declares the noise non-Gaussian to the estimators, which refuse it.
func (c *ImpulseNoise) Nature() link.Kind { return link.NonGaussian }
