// Package carrier holds feed-forward carrier-phase recovery: estimators that look at a window
// of received symbols around each symbol, estimate the carrier phase there without decisions
// fed back, unwrap the estimates into a continuous track and derotate.
//
//   - MPower, the M-th power estimator of Viterbi and Viterbi (IEEE Trans. Inf. Theory, 1983),
//     for M-PSK;
//   - BlindPhase, the blind phase search of Pfau, Hoffmann and Noé (J. Lightwave Technol.,
//     2009), for QAM (and any constellation).
//
// Both work at one sample per symbol (after the matched filter and symbol sampler), read the
// frame's Constellation, and treat each frame on its own: the track starts from the first
// window's estimate taken within ±π/S of zero, S the rotational symmetry of the constellation
// (M for M-PSK, 4 for square QAM). That is the phase reference a frame is assumed to start
// with (see impair.PhaseNoise, whose phase starts at zero).
//
// Ambiguity and cycle slips: a symmetric constellation looks the same turned by 2π/S, so any
// blind estimator knows the phase only modulo 2π/S. A constant offset beyond ±π/S, a random
// starting phase, or noise pushing the unwrapped track over a boundary (a cycle slip) leaves
// the derotated signal turned by a multiple of 2π/S, and a coherent detector then gets every
// following symbol of the frame wrong. Without differential coding, that is the honest BER of
// a coherent receiver with blind recovery: slips count as errors, and the frame length (the
// distance between phase references) matters.
//
// The remedy is differential coding, which puts the data in phase changes. blocks/modem's
// DQPSK does so and detects from y_i·conj(y_{i−1}): it needs no absolute phase, so a slip or an
// ambiguity costs it the one symbol that straddles it. It can stand behind recovery, which then
// only steadies the phase between neighbouring symbols:
//
//	m := modem.DQPSK()
//	link.Chain(source.Random(4096), m.Mod(), impair.PhaseNoise(1e-3).RandomStart(),
//		channel.AWGN(db), carrier.MPower(32), m.Demod())
//
// (the recovery reads the frame's constellation, which for DQPSK is {1, j, −1, −j}, four-fold).
// Differential detection costs Eb/N0 against coherent QPSK. Coherent detection followed by
// differential decoding keeps the slip tolerance for about twice the coherent BER:
// modem.DEQPSK (and DEBPSK) behind the recovery.
package carrier

import (
	"fmt"
	"math"

	"tally/blocks/link"
)

// unwrap turns per-symbol estimates known modulo period into a continuous track, starting
// within ±period/2 of zero, and derotates the samples by it.
func unwrap(x []complex128, est []float64, period float64) {
	prev := 0.0
	for k, e := range est {
		th := e + period*math.Round((prev-e)/period)
		prev = th
		s, c := math.Sincos(-th)
		x[k] *= complex(c, s)
	}
}

// check reports a frame the estimators cannot work on.
func check(name string, f *link.Frame) error {
	if f.SPS > 1 {
		return fmt.Errorf("%s needs one sample per symbol (SPS = %d): place it after the matched filter and sampler", name, f.SPS)
	}
	if len(f.Constellation) == 0 {
		return fmt.Errorf("%s needs the modulator's constellation in the frame", name)
	}
	return nil
}

// prefix fills p (length len(v)+1) with the running sums of v, for window sums p[hi] − p[lo].
func prefix(p, v []float64) {
	p[0] = 0
	for i, x := range v {
		p[i+1] = p[i] + x
	}
}

// window is the span [lo, hi) of the window of length l around symbol k of n.
func window(k, l, n int) (lo, hi int) {
	lo = k - l/2
	hi = lo + l
	return max(lo, 0), min(hi, n)
}
