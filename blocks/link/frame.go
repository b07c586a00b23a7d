// Package link holds what every block shares: the Frame that flows through a link, the
// Block interface, and Link, the ordered chain of blocks for one sweep point.
//
// A frame carries the buffers of each stage of the block diagram
//
//	source → coder → modulator → channel / impairments → receiver → decoder → counter
//
// Bits (information bits) → Coded (the bits the modulator maps) → Samples (the complex
// baseband signal, changed in place by channels and impairments) → LLR and Hard (the
// demodulator's soft and hard outputs, coded domain) → Out (decoded information bits).
//
// Energy conventions, relied on by every block:
//   - Modulators emit one sample per symbol with unit average symbol energy, Es = 1, and set
//     BitsPerSymbol. Coders multiply CodeRate. Es/N0 = Eb/N0 · BitsPerSymbol · CodeRate.
//   - Complex baseband noise of density N0 has variance N0/2 per real dimension per sample.
//   - Pulse shapers use unit-energy filters, so symbol energy stays Es spread over SPS samples and a
//     unit-energy matched filter sampled at the symbol instants sees Es/N0: the channel sets the
//     noise per sample from Es and N0 whatever SPS is.
//   - Channels record the N0 they used in the frame; demappers read it for their LLRs.
//
// Every frame is independent: a block must not carry signal state from one frame to the next
// (filters start empty, phase processes start from a state drawn from the frame's stream), since
// frames run on any worker in any order. Blocks keep only scratch buffers between frames.
package link

import "tally/blocks/rng"

// Frame is one frame of a link: the buffers of every stage plus what blocks tell each other.
//
// What a custom block sees depends on where it sits. Every field starts each frame at its
// zero value (SPS, CodeRate and Es at 1) and is filled by the blocks before it. On a link with
// no decoder Out stays nil and Coded is the same slice as Bits: the link then counts Hard
// against Bits for the BER tap, so a block after the demodulator that changes the decisions
// changes Hard (setting Out makes the link count Out instead). After a decoder Out holds the
// decoded bits and Hard the coded decisions, which the pre-decoder tap counts against Coded.
type Frame struct {
	Point int // sweep point index
	Index int // frame index within the point

	Bits  []byte // information bits, one per byte (0 or 1), from the source
	Coded []byte // bits the modulator maps; the same slice as Bits when the link has no coder

	Samples []complex128 // baseband signal, SPS samples per symbol
	SPS     int          // samples per symbol (1 after a modulator)
	Symbols int          // symbols in the frame

	// Real is true while the signal lies on the real axis (BPSK, PAM, OOK): a channel then only
	// needs noise in the real dimension. PendingImagSigma is the standard deviation of the
	// imaginary noise a channel left out; a block that mixes I and Q calls MakeComplex first.
	Real             bool
	PendingImagSigma float64

	BitsPerSymbol int          // set by the modulator
	CodeRate      float64      // product of the rates of the coders in the link (1 when uncoded)
	Es            float64      // average symbol energy of the signal (1 after a modulator)
	N0            float64      // noise density the channel used (0 before a channel)
	Gain          []complex128 // per-symbol channel gain, for receivers with perfect channel knowledge

	LLR  []float64 // soft outputs, log(P(b=0)/P(b=1)) per coded bit
	Hard []byte    // hard decisions per coded bit
	Out  []byte    // decoded information bits; the link counts Out against Bits, or Hard when Out is nil (no decoder)

	Constellation []complex128 // the modulator's points, indexed by symbol label, for receivers

	// What the estimators pass along (see Link.Estimate); zero in plain counting.
	Estimator Estimator // the link's estimator, set before the first block
	// Weight is, under importance sampling, the likelihood ratio of each sample's noise (the
	// unbiased density over the biased one), set by the noise block: one per symbol.
	Weight []float64
	// NoiseVar is, in semi-analytic estimation, the variance per real dimension of the Gaussian
	// noise the noise block left out, carried through the linear blocks after it.
	NoiseVar float64
	// Flip is, in semi-analytic estimation, the probability that the noise would flip each hard
	// decision of the noise-free signal, set by the detector: one per bit of Hard.
	Flip []float64

	// pendingKey, in a paired link (see Paired), keys the stream that MakeComplex draws the
	// pending imaginary noise from: derived from the stream of the block that left it out, so
	// the imaginary noise belongs to the noise's role, not to whichever block mixes I and Q
	// first (an equaliser in one variant, the detector in the other).
	pendingKey uint64
	pendingSet bool
}

// GrowBytes returns s resized to n, reusing its storage when it is large enough.
// (Three plain functions rather than one generic one: scripts run in an interpreter whose
// generics are limited.)
func GrowBytes(s []byte, n int) []byte {
	if cap(s) >= n {
		return s[:n]
	}
	return make([]byte, n)
}

// GrowFloats returns s resized to n, reusing its storage when it is large enough.
func GrowFloats(s []float64, n int) []float64 {
	if cap(s) >= n {
		return s[:n]
	}
	return make([]float64, n)
}

// GrowComplex returns s resized to n, reusing its storage when it is large enough.
func GrowComplex(s []complex128, n int) []complex128 {
	if cap(s) >= n {
		return s[:n]
	}
	return make([]complex128, n)
}

// MakeComplex readies a real-valued signal for a block that mixes I and Q (a rotation, a
// complex filter): it adds the imaginary noise a channel left out as irrelevant while the
// signal was real, drawing it from r, the calling block's stream.
func (f *Frame) MakeComplex(r *rng.Stream) {
	if f.Real && f.PendingImagSigma > 0 {
		if f.pendingSet {
			var s rng.Stream
			s.Reset(rng.Key(f.pendingKey, 0, 0, 0))
			s.AddImagNoise(f.Samples, f.PendingImagSigma)
		} else {
			r.AddImagNoise(f.Samples, f.PendingImagSigma)
		}
	}
	f.Real, f.PendingImagSigma = false, 0
}

// notePending records, in a paired link, the stream key of the block that has just left
// imaginary noise pending (see pendingKey).
func (f *Frame) notePending(key uint64) {
	if f.Real && f.PendingImagSigma > 0 && !f.pendingSet {
		f.pendingKey, f.pendingSet = key, true
	}
}

// EsN0 is the Es/N0 (linear) that corresponds to an Eb/N0 (linear) in this frame.
func (f *Frame) EsN0(ebn0 float64) float64 {
	r := f.CodeRate
	if r == 0 {
		r = 1
	}
	return ebn0 * float64(f.BitsPerSymbol) * r
}
