// Package equalize holds symbol-spaced linear equalisers for intersymbol interference:
// zero-forcing and MMSE designed from known channel taps, and an adaptive (normalised LMS)
// equaliser trained on a known preamble and then decision-directed.
//
// All of them are FIR filters w of Length taps with a decision delay d: the output for symbol
// k is
//
//	z[k] = Σⱼ w[j]·r[k + d − j],   j = 0 … Length−1,
//
// where r is the frame's received signal at one sample per symbol, timed to the channel's
// strongest path as channel.Multipath delivers it (samples outside the frame read as zero,
// since every frame starts with empty filters). The frame keeps one sample per
// symbol, so the demodulator follows directly:
//
//	ch := channel.Multipath([]complex128{0.3, 1, 0.4i})
//	link.Chain(src, m.Mod(), ch, channel.AWGN(ebn0), equalize.MMSE(ch.Taps(), 11), m.Demod())
//
// Each block sets f.N0 to the density of the noise plus the residual interference at its
// output, so soft demappers scale their LLRs right (the interference counted as Gaussian
// noise).
package equalize

import (
	"tally/blocks/link"
	"tally/blocks/rng"
)

// filter computes z[k] = scale·Σⱼ w[j]·r[k+d−j] into out (len(out) = len(r)).
func filter(out, r, w []complex128, d int, scale complex128) {
	n := len(r)
	for k := range out {
		var s complex128
		for j, c := range w {
			if i := k + d - j; i >= 0 && i < n {
				s += c * r[i]
			}
		}
		out[k] = s * scale
	}
}

// realTaps reports whether every tap is real.
func realTaps(w []complex128) bool {
	for _, c := range w {
		if imag(c) != 0 {
			return false
		}
	}
	return true
}

// prepare readies the frame for a filter with weights w: one whose taps mix I and Q, or that
// would filter pending imaginary noise, needs the full complex signal first.
func prepare(f *link.Frame, r *rng.Stream, w []complex128) {
	if f.PendingImagSigma > 0 || !realTaps(w) {
		f.MakeComplex(r)
	}
}

func abs2(c complex128) float64 { return real(c)*real(c) + imag(c)*imag(c) }
