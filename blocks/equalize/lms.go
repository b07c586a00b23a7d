package equalize

import (
	"fmt"
	"math"
	"math/cmplx"

	"tally/blocks/internal/limit"
	"tally/blocks/link"
	"tally/blocks/rng"
)

// Adaptive is an adaptive linear equaliser updated by the normalised LMS rule
//
//	e = a − z,   w[j] ← w[j] + μ·e·r*[k+d−j] / (ε + Σⱼ|r[k+d−j]|²)
//
// (Haykin, Adaptive Filter Theory, 4th ed., 2002, ch. 6), where a is the known symbol during
// training and the nearest constellation point to z (f.Constellation) after it
// (decision-directed). The normalisation makes the step μ (0 < μ < 2) independent of the
// signal level; the excess mean-square error grows roughly as μ/(2−μ) and the convergence takes
// some Length/μ symbols.
//
// Every frame starts afresh (weights: 1 at the delay, 0 elsewhere) and carries its own
// training preamble: its first Train symbols, known to the receiver (taken from f.Coded and
// f.Constellation, labels most significant bit first as the modem package maps them). The
// equaliser adapts Passes times over the preamble (20 by default: passes are cheap and the
// slowest modes of the LMS need many of them), then runs over the whole frame from its
// start, adapting on the preamble and then on its own decisions; the preamble's symbols are
// output and counted like the rest. The LMS tends to the Wiener (MMSE) solution, whose output
// is biased (z ≈ c·a + noise, c < 1): the output is divided by c estimated over the frame,
// Σz·a*/Σ|a|² with a the known or decided symbols, and f.N0 becomes the mean |z − a|² after the
// preamble (noise plus residual ISI, as the receiver would estimate them).
type Adaptive struct {
	Length int     // taps
	Step   float64 // normalised step μ, 0 < μ < 2
	Train  int     // training symbols at the start of every frame
	Passes int     // adaptation passes over the preamble before the frame is equalised
	D      int     // decision delay in symbols (default Length/2)
	Block  string  // name in messages

	err error
	w   []complex128
	ref []complex128
	out []complex128
	dec []complex128
}

// LMS is the adaptive equaliser of length taps with normalised step mu (e.g. 0.05), trained
// on the first 256 symbols of every frame; see Adaptive.
func LMS(length int, mu float64) *Adaptive {
	e := &Adaptive{Length: length, Step: mu, Train: 256, Passes: 20, D: length / 2, Block: "equalize.LMS"}
	switch {
	case length < 1:
		e.err = fmt.Errorf("%s: length %d must be ≥ 1", e.Block, length)
	case length > limit.Taps:
		e.err = limit.Length(e.Block, length)
	case !(mu > 0 && mu < 2):
		e.err = fmt.Errorf("%s: step μ = %v must lie in (0, 2)", e.Block, mu)
	}
	return e
}

// Training sets the preamble length in symbols (≥ 0; 0: decision-directed from the start).
func (e *Adaptive) Training(symbols int) *Adaptive {
	e.Train = symbols
	if symbols < 0 && e.err == nil {
		e.err = fmt.Errorf("%s: training %d symbols must be ≥ 0", e.Block, symbols)
	}
	return e
}

// TrainPasses sets the adaptation passes over the preamble (≥ 0, default 20).
func (e *Adaptive) TrainPasses(n int) *Adaptive {
	e.Passes = n
	if n < 0 && e.err == nil {
		e.err = fmt.Errorf("%s: passes %d must be ≥ 0", e.Block, n)
	}
	return e
}

// Delay sets the decision delay in symbols (0 … Length−1).
func (e *Adaptive) Delay(d int) *Adaptive {
	e.D = d
	if (d < 0 || d >= e.Length) && e.err == nil {
		e.err = fmt.Errorf("%s: delay %d must lie in 0 … %d", e.Block, d, e.Length-1)
	}
	return e
}

// Name is the constructor's name.
func (e *Adaptive) Name() string { return e.Block }

// Err reports a bad parameter.
func (e *Adaptive) Err() error { return e.err }

// Process equalises the frame.
func (e *Adaptive) Process(f *link.Frame, r *rng.Stream) error {
	if f.SPS > 1 {
		return fmt.Errorf("needs one sample per symbol (SPS = %d): put pulse.Sample before it", f.SPS)
	}
	pts := f.Constellation
	if len(pts) == 0 {
		return fmt.Errorf("no constellation in the frame for decisions (is a modulator missing?)")
	}
	x := f.Samples
	n := len(x)
	train := min(e.Train, n)
	k := f.BitsPerSymbol
	if train > 0 && (k < 1 || len(f.Coded) < train*k || 1<<k > len(pts)) {
		return fmt.Errorf("cannot read the %d training symbols from the coded bits", train)
	}
	f.MakeComplex(r) // complex weights
	e.ref = link.GrowComplex(e.ref, train)
	for i := range e.ref {
		l := 0
		for _, b := range f.Coded[i*k : i*k+k] {
			l = l<<1 | int(b&1)
		}
		e.ref[i] = pts[l]
	}
	e.w = link.GrowComplex(e.w, e.Length)
	clear(e.w)
	e.w[e.D] = 1
	for range e.Passes {
		for i := range train {
			e.update(x, i, e.ref[i])
		}
	}
	e.out = link.GrowComplex(e.out, n)
	e.dec = link.GrowComplex(e.dec, n)
	var za complex128 // Σ z·conj(a), for the gain on the wanted symbol
	var aa float64
	for i := range n {
		var a, z complex128
		if i < train {
			a = e.ref[i]
			z = e.update(x, i, a)
		} else {
			z = e.output(x, i)
			a = nearest(pts, z)
			e.adapt(x, i, a-z)
		}
		e.out[i], e.dec[i] = z, a
		za += z * cmplx.Conj(a)
		aa += abs2(a)
	}
	// The Wiener solution the LMS tends to is biased, z ≈ c·a + noise with c < 1; divide by the
	// estimated c so that QAM decisions see the constellation at its own scale.
	if aa > 0 && za != 0 {
		g := complex(aa, 0) / za
		var mse float64
		for i := range e.out {
			e.out[i] *= g
			if i >= train {
				mse += abs2(e.out[i] - e.dec[i])
			}
		}
		if n > train {
			f.N0 = mse / float64(n-train)
		}
	}
	f.Samples = e.out
	return nil
}

// output is z[i] with the current weights.
func (e *Adaptive) output(x []complex128, i int) complex128 {
	var s complex128
	for j, c := range e.w {
		if t := i + e.D - j; t >= 0 && t < len(x) {
			s += c * x[t]
		}
	}
	return s
}

// update computes z[i], adapts towards a, and returns z[i] (before the update).
func (e *Adaptive) update(x []complex128, i int, a complex128) complex128 {
	z := e.output(x, i)
	e.adapt(x, i, a-z)
	return z
}

// adapt applies the normalised LMS step for error err at symbol i.
func (e *Adaptive) adapt(x []complex128, i int, err complex128) {
	p := 1e-12
	for j := range e.w {
		if t := i + e.D - j; t >= 0 && t < len(x) {
			p += abs2(x[t])
		}
	}
	g := err * complex(e.Step/p, 0)
	for j := range e.w {
		if t := i + e.D - j; t >= 0 && t < len(x) {
			e.w[j] += g * cmplx.Conj(x[t])
		}
	}
}

// nearest is the constellation point closest to z.
func nearest(pts []complex128, z complex128) complex128 {
	best, bd := pts[0], math.Inf(1)
	for _, p := range pts {
		if d := abs2(z - p); d < bd {
			best, bd = p, d
		}
	}
	return best
}

// Nature declares the equaliser adaptive to the estimators, which refuse it after the noise.
func (e *Adaptive) Nature() link.Kind { return link.Adaptive }
