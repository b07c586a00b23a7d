package pulse

import (
	"fmt"

	"tally/blocks/link"
	"tally/blocks/rng"
)

// Sampler returns an oversampled frame to one sample per symbol: it keeps sample
// Lead + k·SPS + Offset for symbol k = 0 … Symbols−1 (Lead as in the package doc) and sets
// f.SPS = 1. Offset is the sampling phase in samples (0: the pulse peaks when the timing is
// right); samples beyond the frame read as zero.
type Sampler struct {
	Offset int    // sampling phase, samples (may be negative)
	Block  string // name in messages
	out    []complex128
}

// Sample is the symbol-rate sampler at the nominal phase.
func Sample() *Sampler { return &Sampler{Block: "pulse.Sample"} }

// Phase sets the sampling phase in samples, early (< 0) or late (> 0).
func (s *Sampler) Phase(samples int) *Sampler { s.Offset = samples; return s }

// Name is the block's name.
func (s *Sampler) Name() string { return s.Block }

// Process downsamples the frame.
func (s *Sampler) Process(f *link.Frame, r *rng.Stream) error {
	sps := max(f.SPS, 1)
	n := f.Symbols
	if n <= 0 {
		return fmt.Errorf("frame has no symbol count (is a modulator missing?)")
	}
	x := f.Samples
	lead := Lead(len(x), n, sps) + s.Offset
	s.out = link.GrowComplex(s.out, n)
	for k := range s.out {
		i := lead + k*sps
		if i >= 0 && i < len(x) {
			s.out[k] = x[i]
		} else {
			s.out[k] = 0
		}
	}
	f.Samples, f.SPS = s.out, 1
	return nil
}

// Nature declares the sampler a linear resampler to the estimators (it keeps the noise
// variance per sample).
func (s *Sampler) Nature() link.Kind { return link.LinearFilter }
