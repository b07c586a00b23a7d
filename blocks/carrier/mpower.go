package carrier

import (
	"fmt"
	"math"
	"math/cmplx"

	"tally/blocks/link"
	"tally/blocks/rng"
)

// MPowerRecovery is the M-th power (Viterbi and Viterbi) feed-forward phase estimator for
// M-PSK (Viterbi and Viterbi, "Nonlinear estimation of PSK-modulated carrier phase with
// application to burst digital transmission", IEEE Trans. Inf. Theory, 1983). Raising a
// sample to the M-th power strips the M-PSK modulation; over a window of L symbols around
// symbol k
//
//	θ̂_k = (1/M)·arg Σ_{i ∈ window(k)} F(|r_i|)·e^{jM·arg r_i} · (c/|c|)^{−M},   F(ρ) = ρ^n,
//
// c any constellation point (all have the same M-th power phase), known modulo 2π/M, then
// unwrapped (package doc). n = M is the plain M-th power; Viterbi and Viterbi show smaller
// n (1 or 2) does better at low SNR. A longer window averages more noise but follows phase
// noise less: the best L grows as the linewidth falls.
type MPowerRecovery struct {
	Window int // L, symbols in the sliding window (centred; truncated at the frame's ends)
	M      int // order; 0 takes the constellation's size
	Power  int // n of F(ρ) = ρ^n; 0 means n = M

	z   []complex128
	pre []complex128
	est []float64
}

// MPower is the M-th power estimator over a window of window symbols, order and weighting
// taken from the constellation (plain M-th power).
func MPower(window int) *MPowerRecovery { return &MPowerRecovery{Window: window} }

// Order sets M (for instance 4 to run the estimator on square QAM).
func (b *MPowerRecovery) Order(m int) *MPowerRecovery { b.M = m; return b }

// Weight sets n of the amplitude weighting F(ρ) = ρ^n.
func (b *MPowerRecovery) Weight(n int) *MPowerRecovery { b.Power = n; return b }

// Name is "carrier.MPower".
func (b *MPowerRecovery) Name() string { return "carrier.MPower" }

// Err reports a window below one symbol, or a negative order or weight.
func (b *MPowerRecovery) Err() error {
	switch {
	case b.Window < 1:
		return fmt.Errorf("carrier.MPower: window %d must be at least 1 symbol", b.Window)
	case b.M < 0 || b.M == 1:
		return fmt.Errorf("carrier.MPower: order M = %d must be at least 2 (0: the constellation's size)", b.M)
	case b.Power < 0:
		return fmt.Errorf("carrier.MPower: weight n = %d must not be negative", b.Power)
	}
	return nil
}

// Process estimates, unwraps and removes the carrier phase.
func (b *MPowerRecovery) Process(f *link.Frame, r *rng.Stream) error {
	if err := check("carrier.MPower", f); err != nil {
		return err
	}
	m := b.M
	if m == 0 {
		m = len(f.Constellation)
	}
	n := b.Power
	if n == 0 {
		n = m
	}
	f.MakeComplex(r)
	x := f.Samples
	ref := cmplx.Conj(ipow(f.Constellation[0], m))
	ref /= complex(cmplx.Abs(ref), 0)

	b.z = link.GrowComplex(b.z, len(x))
	b.pre = link.GrowComplex(b.pre, len(x)+1)
	b.est = link.GrowFloats(b.est, len(x))
	for i, v := range x {
		z := ipow(v, m) * ref
		if n != m {
			if a := cmplx.Abs(v); a > 0 {
				z *= complex(math.Pow(a, float64(n-m)), 0)
			}
		}
		b.z[i] = z
		b.pre[i+1] = b.pre[i] + z
	}
	for k := range x {
		lo, hi := window(k, b.Window, len(x))
		b.est[k] = cmplx.Phase(b.pre[hi]-b.pre[lo]) / float64(m)
	}
	unwrap(x, b.est, 2*math.Pi/float64(m))
	return nil
}

// ipow is v^m by repeated squaring (exact enough, and much faster than cmplx.Pow).
func ipow(v complex128, m int) complex128 {
	p := complex(1, 0)
	for m > 0 {
		if m&1 != 0 {
			p *= v
		}
		v *= v
		m >>= 1
	}
	return p
}

// Nature declares the recovery adaptive to the estimators, which refuse it after the noise.
func (b *MPowerRecovery) Nature() link.Kind { return link.Adaptive }
