package noise

import (
	"errors"
	"math"

	"tally/blocks/channel"
	"tally/blocks/link"
	"tally/blocks/rng"
)

// LaplaceNoise adds independent Laplacian noise to I and Q, each of density
//
//	p(x) = exp(−|x|/b)/(2b),   variance 2b² = N0/2, so b = √(N0)/2,
//
// a heavier-tailed (yet finite-variance) stand-in for impulsive interference. Note that the
// noise is not circular: its level lines are diamonds, not circles.
type LaplaceNoise struct {
	Level channel.WhiteNoise // the noise level, set like channel.AWGN's
}

// Laplacian is Laplacian noise at ebn0 dB of Eb/N0.
func Laplacian(ebn0 float64) *LaplaceNoise {
	return &LaplaceNoise{Level: channel.WhiteNoise{DB: ebn0, By: channel.EbN0, Block: "noise.Laplacian"}}
}

// By says which ratio the level states (channel.EbN0, channel.EsN0 or channel.SNR).
func (c *LaplaceNoise) By(l channel.Level) *LaplaceNoise { c.Level.By = l; return c }

// Name is "noise.Laplacian".
func (c *LaplaceNoise) Name() string { return c.Level.Block }

// Err reports a bad level.
func (c *LaplaceNoise) Err() error { return c.Level.Err() }

// Process adds the noise and sets f.N0.
func (c *LaplaceNoise) Process(f *link.Frame, r *rng.Stream) error {
	n0, ok := level(&c.Level, f)
	if !ok {
		return errors.New(errNoModulator)
	}
	f.MakeComplex(r)
	f.N0 = n0
	b := math.Sqrt(n0) / 2
	g := r.Rand()
	for i := range f.Samples {
		// A Laplacian is an exponential of random sign; one draw gives both signs' bits.
		w := r.Uint64()
		ni, nq := b*g.ExpFloat64(), b*g.ExpFloat64()
		if w&1 != 0 {
			ni = -ni
		}
		if w&2 != 0 {
			nq = -nq
		}
		f.Samples[i] += complex(ni, nq)
	}
	return nil
}

// Nature declares the noise non-Gaussian to the estimators, which refuse it.
func (c *LaplaceNoise) Nature() link.Kind { return link.NonGaussian }
