// Package channel holds the propagation channels: additive white Gaussian noise and fading.
package channel

import (
	"fmt"
	"math"

	"tally/blocks/link"
	"tally/blocks/rng"
)

// Level says how an AWGN channel's noise is set.
type Level int

// The three ways to state the noise level; the number is in dB in each case.
const (
	EbN0 Level = iota // energy per information bit over N0
	EsN0              // energy per symbol over N0
	SNR               // signal power over noise power per sample (in the oversampled signal)
)

// WhiteNoise adds circular complex white Gaussian noise of density N0: variance N0/2 per real
// dimension per sample. With Es the frame's symbol energy,
//
//	Es/N0 = Eb/N0 · BitsPerSymbol · CodeRate,   N0 = Es / (Es/N0),
//	SNR per sample = (Es/SPS) / N0  (so N0 = Es / (SPS · SNR)).
//
// On a real-valued signal (BPSK, PAM, OOK) only the real noise is drawn; the imaginary half is
// left pending (link.Frame.MakeComplex) since a real-axis detector ignores it.
//
// Under the link's estimators (link.Link.Estimate) the block changes what it draws; see
// estimate.go: importance sampling draws biased noise and reports likelihood ratios, the
// semi-analytic estimator draws none and reports the variance it left out.
type WhiteNoise struct {
	DB    float64 // the level in dB
	By    Level   // which ratio DB states
	Block string  // name in messages
	// Shift is the mean translation of importance sampling per real dimension, in the
	// signal's amplitude (the distance from a point to its decision boundary is the best
	// choice); 0 chooses it from the frame's constellation (see Bias).
	Shift float64

	bias biasing // importance sampling scratch
}

// AWGN is the usual channel, set by Eb/N0 in dB.
func AWGN(db float64) *WhiteNoise { return &WhiteNoise{DB: db, By: EbN0, Block: "channel.AWGN"} }

// AWGNEsN0 is the channel set by Es/N0 in dB.
func AWGNEsN0(db float64) *WhiteNoise {
	return &WhiteNoise{DB: db, By: EsN0, Block: "channel.AWGNEsN0"}
}

// AWGNSNR is the channel set by the SNR per sample in dB.
func AWGNSNR(db float64) *WhiteNoise { return &WhiteNoise{DB: db, By: SNR, Block: "channel.AWGNSNR"} }

// Name is the constructor's name.
func (c *WhiteNoise) Name() string { return c.Block }

// Err reports a level that is not a finite number, or a bad shift.
func (c *WhiteNoise) Err() error {
	if math.IsNaN(c.DB) || math.IsInf(c.DB, 0) {
		return fmt.Errorf("%s: level %v dB is not a finite number", c.Block, c.DB)
	}
	if !(c.Shift >= 0) || math.IsInf(c.Shift, 1) {
		return fmt.Errorf("%s.Bias: shift %v must be a finite number ≥ 0 (0 chooses it)", c.Block, c.Shift)
	}
	return nil
}

// N0 is the noise density this channel uses on frame f.
func (c *WhiteNoise) N0(f *link.Frame) float64 {
	lin := math.Pow(10, c.DB/10)
	es := f.Es
	if es == 0 {
		es = 1
	}
	switch c.By {
	case EsN0:
		return es / lin
	case SNR:
		sps := f.SPS
		if sps < 1 {
			sps = 1
		}
		return es / (float64(sps) * lin)
	default:
		if f.BitsPerSymbol == 0 {
			return math.NaN()
		}
		return es / f.EsN0(lin)
	}
}

// Process adds the noise.
func (c *WhiteNoise) Process(f *link.Frame, r *rng.Stream) error {
	n0 := c.N0(f)
	if math.IsNaN(n0) {
		return fmt.Errorf("Eb/N0 needs a modulator before the channel (bits per symbol unknown)")
	}
	sigma := math.Sqrt(n0 / 2)
	f.N0 = n0
	switch f.Estimator {
	case link.Importance:
		return c.biased(f, r, sigma)
	case link.SemiAnalytic:
		f.NoiseVar = sigma * sigma
		f.PendingImagSigma = 0
		return nil
	}
	if f.Real {
		r.AddRealNoise(f.Samples, sigma)
		f.PendingImagSigma = sigma
		return nil
	}
	r.AddNoise(f.Samples, sigma)
	return nil
}
