package equalize

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/mat"

	"tally/blocks/channel"
	"tally/blocks/internal/limit"
	"tally/blocks/link"
	"tally/blocks/rng"
)

// Linear is a linear FIR equaliser designed from known channel taps h (symbol spaced).
// With H the (Length+len(h)−1) × Length convolution matrix of h, so that Hw = w ∗ h is the
// combined response c, and e_d the unit vector at the delay d, the weights solve
//
//	(HᴴH + λI)·w = Hᴴe_d,
//
// λ = 0 for zero forcing (the least-squares ZF of finite length: c as close to e_d as Length
// taps allow) and λ = N0/Es for MMSE (the Wiener solution minimising E|z − a|²; Proakis,
// Digital Communications, 4th ed., 2001, §10.2). N0 is the frame's f.N0, set by the noise
// channel, so the MMSE weights are designed for the point's noise level (and kept while it
// does not change). The output is divided by c_d, the gain on the wanted symbol, so that QAM
// decisions see the constellation at its own scale (for MMSE this is the unbiased MMSE
// equaliser); f.N0 becomes (N0·‖w‖² + Es·Σ_{m≠d}|c_m|²)/|c_d|², noise plus residual ISI.
//
// The delay d counts from the channel's first tap and defaults to the one with the least
// design error (over 0 … Length+len(h)−2); Delay fixes it. Since channel.Multipath times the
// receiver to the strongest path m = channel.MainPath(h), the filter runs on the received
// samples with delay d − m.
type Linear struct {
	Taps   []complex128 // the channel taps, symbol spaced (as the channel applies them)
	Length int          // equaliser taps
	D      int          // decision delay in symbols; −1 chooses the best
	MMSE   bool         // minimum mean-square error design (else zero forcing)
	Block  string       // name in messages

	err    error
	lambda float64      // λ of the cached design (−1: none)
	w      []complex128 // cached weights
	d      int          // cached delay
	c      []complex128 // cached combined response
	out    []complex128
}

// ZF is the zero-forcing equaliser of length taps for the channel taps h; see Linear.
func ZF(h []complex128, length int) *Linear { return newLinear(h, length, false, "equalize.ZF") }

// MMSE is the minimum mean-square error equaliser of length taps for the channel taps h, for
// the noise level the frame reports; see Linear.
func MMSE(h []complex128, length int) *Linear {
	return newLinear(h, length, true, "equalize.MMSE")
}

func newLinear(h []complex128, length int, mmse bool, name string) *Linear {
	e := &Linear{Taps: append([]complex128(nil), h...), Length: length, D: -1, MMSE: mmse, Block: name, lambda: -1}
	energy := 0.0
	for i, c := range h {
		if cmplx.IsNaN(c) || cmplx.IsInf(c) {
			e.err = fmt.Errorf("%s: channel tap %d = %v is not a finite number", name, i, c)
			return e
		}
		energy += abs2(c)
	}
	switch {
	case len(h) == 0 || energy == 0:
		e.err = fmt.Errorf("%s: channel taps %v have no energy", name, h)
	case length < 1:
		e.err = fmt.Errorf("%s: length %d must be ≥ 1", name, length)
	case length > limit.Taps:
		e.err = limit.Length(name, length)
	case !mmse:
		e.design(0) // zero forcing needs no noise level: design now, report trouble early
	}
	return e
}

// Delay fixes the decision delay d in symbols (0 … Length+len(h)−2).
func (e *Linear) Delay(d int) *Linear {
	e.D, e.lambda = d, -1
	if (d < 0 || d > e.Length+len(e.Taps)-2) && e.err == nil {
		e.err = fmt.Errorf("%s: delay %d must lie in 0 … %d", e.Block, d, e.Length+len(e.Taps)-2)
	}
	if !e.MMSE && e.err == nil {
		e.design(0)
	}
	return e
}

// Name is the constructor's name.
func (e *Linear) Name() string { return e.Block }

// Err reports a bad parameter.
func (e *Linear) Err() error { return e.err }

// Weights returns the weights and delay designed for noise-to-signal ratio N0/Es (ignored by
// zero forcing), and the combined response c = w ∗ h.
func (e *Linear) Weights(n0es float64) (w []complex128, d int, c []complex128) {
	if !e.MMSE {
		n0es = 0
	}
	e.design(n0es)
	return append([]complex128(nil), e.w...), e.d, append([]complex128(nil), e.c...)
}

// design computes and caches the weights for λ.
func (e *Linear) design(lambda float64) {
	if e.err != nil || lambda == e.lambda {
		return
	}
	h, n := e.Taps, e.Length
	m := n + len(h) - 1
	// Real embedding of the complex normal equations: A = HᴴH + λI is Hermitian,
	// [Re A, −Im A; Im A, Re A]·[Re w; Im w] = [Re b; Im b].
	A := mat.NewDense(2*n, 2*n, nil)
	for i := range n {
		for j := range n {
			var s complex128 // (HᴴH)[i][j] = Σ_r conj(H[r][i])·H[r][j] = Σ_l conj(h[l])·h[l+i−j]
			for l := range h {
				if k := l + i - j; k >= 0 && k < len(h) {
					s += cmplx.Conj(h[l]) * h[k]
				}
			}
			if i == j {
				s += complex(lambda, 0)
			}
			A.Set(i, j, real(s))
			A.Set(i, j+n, -imag(s))
			A.Set(i+n, j, imag(s))
			A.Set(i+n, j+n, real(s))
		}
	}
	var lu mat.LU
	lu.Factorize(A)
	best := math.Inf(1)
	lo, hi := 0, m-1
	if e.D >= 0 {
		lo, hi = e.D, e.D
	}
	b := mat.NewVecDense(2*n, nil)
	var x mat.VecDense
	w := make([]complex128, n)
	c := make([]complex128, m)
	for d := lo; d <= hi; d++ {
		b.Zero()
		for j := range n { // (Hᴴe_d)[j] = conj(h[d−j])
			if k := d - j; k >= 0 && k < len(h) {
				b.SetVec(j, real(h[k]))
				b.SetVec(j+n, -imag(h[k]))
			}
		}
		if err := lu.SolveVecTo(&x, false, b); err != nil {
			// An ill-conditioned but solvable system still gives its least-squares answer;
			// only a singular one (infinite condition number) has none.
			var cond mat.Condition
			if !errors.As(err, &cond) || math.IsInf(float64(cond), 1) {
				e.err = fmt.Errorf("%s: the channel taps %v cannot be equalised (%v)", e.Block, h, err)
				return
			}
		}
		for j := range w {
			w[j] = complex(x.AtVec(j), x.AtVec(j+n))
		}
		// Design error: Es·‖c − e_d‖² + N0·‖w‖² (per Es).
		clear(c)
		for j, wj := range w {
			for l, hl := range h {
				c[j+l] += wj * hl
			}
		}
		cost := 0.0
		for i, ci := range c {
			if i == d {
				ci -= 1
			}
			cost += abs2(ci)
		}
		for _, wj := range w {
			cost += lambda * abs2(wj)
		}
		if cost < best {
			best = cost
			e.w = append(e.w[:0], w...)
			e.c = append(e.c[:0], c...)
			e.d = d
		}
	}
	e.lambda = lambda
}

// Process equalises the frame.
func (e *Linear) Process(f *link.Frame, r *rng.Stream) error {
	if f.SPS > 1 {
		return fmt.Errorf("needs one sample per symbol (SPS = %d): put pulse.Sample before it", f.SPS)
	}
	es := f.Es
	if es == 0 {
		es = 1
	}
	lambda := 0.0
	if e.MMSE {
		lambda = f.N0 / es
	}
	e.design(lambda)
	if e.err != nil {
		return e.err
	}
	cd := e.c[e.d]
	if cd == 0 {
		return fmt.Errorf("the design has no gain on the wanted symbol")
	}
	prepare(f, r, e.w)
	e.out = link.GrowComplex(e.out, len(f.Samples))
	filter(e.out, f.Samples, e.w, e.d-channel.MainPath(e.Taps), 1/cd)
	var wn, isi float64
	for _, w := range e.w {
		wn += abs2(w)
	}
	for i, c := range e.c {
		if i != e.d {
			isi += abs2(c)
		}
	}
	f.N0 = (f.N0*wn + es*isi) / abs2(cd)
	f.Samples = e.out
	return nil
}
