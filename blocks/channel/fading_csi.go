package channel

import (
	"fmt"
	"math/cmplx"

	"tally/blocks/link"
	"tally/blocks/rng"
)

// GainCorrection is the receiver with perfect channel knowledge (perfect CSI): it divides
// every symbol-rate sample by the gain the fading channel recorded in f.Gain,
//
//	y[k] = x[k] / h[k] = x[k]·h*[k]/|h[k]|²   (zero forcing: derotate and scale),
//
// so PSK and QAM decisions see the transmitted constellation again. f.Gain is left in place.
// The noise on symbol k is now N0/|h[k]|², while f.N0 still says N0: hard decisions are right,
// but a soft demapper that reads f.N0 alone gives LLRs of the wrong size in a fade. For soft
// outputs, drop this block and use a demodulator that reads f.Gain itself (derotates, scales
// and weights its LLRs by |h|²).
//
// PhaseOnly derotates without scaling, y = x·h*/|h|: the noise keeps density N0 and the signal
// amplitude |h| remains, which is enough for PSK hard decisions, not for QAM.
//
// Without this block (no CSI) the gain stays on the signal: for PSK its random phase makes a
// coherent detector fail (BER near 1/2), so the no-CSI case is only meaningful for
// noncoherent detection or with block fading and a receiver of one's own that estimates h.
//
// It works on one sample per symbol (after pulse.Sample when the link is oversampled).
type GainCorrection struct {
	PhaseOnly bool   // derotate only; keep the amplitude
	Block     string // name in messages
}

// KnownGain is the perfect-CSI receiver front end: divides each symbol by its channel gain.
func KnownGain() *GainCorrection { return &GainCorrection{Block: "channel.KnownGain"} }

// Derotate is the perfect-CSI correction of the phase only (for PSK).
func Derotate() *GainCorrection { return &GainCorrection{PhaseOnly: true, Block: "channel.Derotate"} }

// Name is the constructor's name.
func (c *GainCorrection) Name() string { return c.Block }

// Process corrects the samples in place.
func (c *GainCorrection) Process(f *link.Frame, r *rng.Stream) error {
	if f.SPS > 1 {
		return fmt.Errorf("needs one sample per symbol (SPS = %d): put pulse.Sample before it", f.SPS)
	}
	n := min(len(f.Samples), len(f.Gain))
	if len(f.Gain) < len(f.Samples) {
		return fmt.Errorf("%d channel gains for %d samples (is a fading channel missing?)", len(f.Gain), len(f.Samples))
	}
	f.MakeComplex(r)
	x := f.Samples[:n]
	for k, h := range f.Gain[:n] {
		a := cmplx.Abs(h)
		switch {
		case a == 0:
			x[k] = 0
		case c.PhaseOnly:
			x[k] *= cmplx.Conj(h) / complex(a, 0)
		default:
			x[k] /= h
		}
	}
	return nil
}
