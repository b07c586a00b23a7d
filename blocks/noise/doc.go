// Package noise holds additive noise channels that are not Gaussian: Middleton's Class A,
// Bernoulli–Gaussian impulse noise and Laplacian noise, the usual models of man-made and
// impulsive interference (power lines, ignition, switching), for which the BER has no closed
// form and a Gaussian receiver is mismatched.
//
// Variance convention, the same for all of them: the total noise variance per complex sample
// is N0 (N0/2 per real dimension, I and Q each), N0 set from Eb/N0, Es/N0 or the SNR per sample
// exactly as channel.AWGN sets it (each channel holds a channel.WhiteNoise for its level and
// asks it for N0). So Eb/N0 keeps its meaning, a curve can be laid beside the AWGN one at the
// same noise power, and demappers that read Frame.N0 see the right power (for a Gaussian
// metric; the optimum metric for these noises is not Gaussian). Each sets Frame.N0.
//
// The noise is always drawn in both dimensions; a real-axis signal is first completed with
// Frame.MakeComplex, and the frame is complex afterwards.
package noise

import (
	"math"

	"tally/blocks/channel"
	"tally/blocks/link"
)

// level is the N0 the channel uses on frame f; false when it cannot be known (Eb/N0 before a
// modulator).
func level(w *channel.WhiteNoise, f *link.Frame) (float64, bool) {
	n0 := w.N0(f)
	return n0, !math.IsNaN(n0)
}

// errNoModulator is the message when Eb/N0 is asked before a modulator has said its bits.
const errNoModulator = "Eb/N0 needs a modulator before the channel (bits per symbol unknown)"

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }
