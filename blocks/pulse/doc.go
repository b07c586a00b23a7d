// Package pulse holds pulse shaping and symbol timing: the root-raised-cosine transmit filter,
// its matched filter, the sampler that returns to one sample per symbol, a timing impairment
// (fractional delay and sampling-clock offset), and Gardner timing recovery, which takes the
// sampler's place when the receiver must find the symbol instants itself:
//
//	link.Chain(src, mod, p.Shape(), pulse.Timing(0.3), channel.AWGN(ebn0), p.Match(), pulse.Gardner(), demod)
//
// A typical oversampled link:
//
//	p := pulse.RRC(0.35).Span(12).SPS(4)
//	link.Chain(src, mod, p.Shape(), channel.AWGN(ebn0), p.Match(), pulse.Sample(), demod)
//
// Energy: the filters have unit energy (Σ g² = 1), so a symbol of energy Es spreads over SPS
// samples, and the matched filter sampled at the symbol instants returns it with amplitude
// √Es and noise variance N0/2 per real dimension: the channel sets its noise per sample from
// Es and N0 whatever the SPS (see link.Frame).
//
// Alignment: every frame is filtered on its own (filters start empty) and in full, tails
// included, so a shaper adds Span·SPS/2 samples before the first symbol and after the last,
// and the matched filter as many again. The symbols therefore stay centred in the frame:
// symbol k's pulse peak is at sample Lead + k·SPS with
//
//	Lead = (len(Samples) − 1 − (Symbols − 1)·SPS) / 2,
//
// which Sample uses to pick the samples of symbols 0 … Symbols−1, so the receiver's symbol k is
// the transmitter's symbol k. Blocks placed between shaper and sampler must keep the frame's
// length (channels, Timing) or pad both ends alike (filters of odd length).
//
// Real signals: the filters have real taps, so a real-axis signal (f.Real) stays real and any
// imaginary noise a channel left pending stays pending; at the symbol instants of a Nyquist
// pulse it is still white with the same variance, which is all a later MakeComplex needs.
package pulse

// Lead is the sample index of symbol 0's pulse centre in a frame of n samples holding symbols
// symbols at sps samples per symbol (see the package doc); 0 at one sample per symbol.
func Lead(n, symbols, sps int) int {
	if sps < 1 {
		sps = 1
	}
	return max((n-1-(symbols-1)*sps)/2, 0)
}
