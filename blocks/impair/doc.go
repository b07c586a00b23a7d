// Package impair holds the carrier and front-end impairments of a link: phase and frequency
// offset, Wiener phase noise, IQ imbalance, DC offset, power-amplifier nonlinearity and the
// analogue-to-digital converter. None of them has a closed-form BER in general, which is why
// they are simulated; each one is exactly the identity when its impairment is switched off
// (zero offset, zero linewidth, infinite back-off, zero bits), so a link with it reduces to the
// ideal AWGN link.
//
// Units, shared by every block:
//   - phases in degrees, frequencies normalised to the symbol rate (f·T), linewidths as
//     Δν·T (linewidth times symbol period);
//   - amplitudes (DC offset, PA levels, ADC full scale) relative to the nominal RMS sample
//     amplitude √(Es/SPS) of the frame (1 right after a modulator), so a setting means the
//     same whatever the pulse shaping;
//   - levels and back-offs in dB.
//
// Blocks that mix I and Q call Frame.MakeComplex first, so a real-axis signal (BPSK, PAM)
// gets the imaginary noise its channel left pending before it is rotated.
package impair

import (
	"math"

	"tally/blocks/link"
)

// rmsAmplitude is the nominal RMS sample amplitude √(Es/SPS) of frame f.
func rmsAmplitude(f *link.Frame) float64 {
	es, sps := f.Es, f.SPS
	if es <= 0 {
		es = 1
	}
	if sps < 1 {
		sps = 1
	}
	return math.Sqrt(es / float64(sps))
}

// finite reports whether v is neither NaN nor infinite.
func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// rad converts degrees to radians.
func rad(deg float64) float64 { return deg * math.Pi / 180 }
