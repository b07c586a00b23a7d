package impair

import (
	"fmt"
	"math"

	"tally/blocks/link"
	"tally/blocks/rng"
)

// IQImbalance is the amplitude and phase mismatch of a quadrature down-converter whose Q
// branch has gain g (relative to the I branch) and a local oscillator φ away from quadrature.
// Mixing r(t) = I·cos ωt − Q·sin ωt with 2cos ωt and −2g·sin(ωt + φ) and low-pass filtering
// gives
//
//	I' = I,   Q' = g·(Q·cos φ − I·sin φ),
//
// that is y = μ·x + ν·x* with μ = (1 + g·e^{−jφ})/2 and ν = (1 − g·e^{jφ})/2 (the I branch is
// the reference, so the imbalance is all in Q). The image (the x* term) sits |μ/ν|² below the
// signal, the image rejection ratio ImageRejection reports.
type IQImbalance struct {
	GainDB   float64 // 20·log10 g, Q-branch gain relative to I, dB
	PhaseDeg float64 // φ, quadrature error of the Q local oscillator, degrees
}

// IQ is an IQ imbalance of gainDB (Q relative to I) and phaseDeg degrees of quadrature error.
func IQ(gainDB, phaseDeg float64) *IQImbalance {
	return &IQImbalance{GainDB: gainDB, PhaseDeg: phaseDeg}
}

// Name is "impair.IQ".
func (b *IQImbalance) Name() string { return "impair.IQ" }

// Err reports a non-finite gain or a phase error of 90° or more (no quadrature left).
func (b *IQImbalance) Err() error {
	if !finite(b.GainDB) {
		return fmt.Errorf("impair.IQ: gain imbalance %v dB is not a finite number", b.GainDB)
	}
	if !finite(b.PhaseDeg) || math.Abs(b.PhaseDeg) >= 90 {
		return fmt.Errorf("impair.IQ: phase imbalance %v degrees must be a number within ±90", b.PhaseDeg)
	}
	return nil
}

// Coefficients are μ and ν of y = μ·x + ν·x*.
func (b *IQImbalance) Coefficients() (mu, nu complex128) {
	g := math.Pow(10, b.GainDB/20)
	s, c := math.Sincos(rad(b.PhaseDeg))
	mu = complex((1+g*c)/2, -g*s/2)
	nu = complex((1-g*c)/2, -g*s/2)
	return mu, nu
}

// ImageRejection is |μ|²/|ν|² in dB (+Inf when balanced).
func (b *IQImbalance) ImageRejection() float64 {
	mu, nu := b.Coefficients()
	m2 := real(mu)*real(mu) + imag(mu)*imag(mu)
	n2 := real(nu)*real(nu) + imag(nu)*imag(nu)
	return 10 * math.Log10(m2/n2)
}

// Process applies the mismatch; a balanced converter leaves the frame untouched.
func (b *IQImbalance) Process(f *link.Frame, r *rng.Stream) error {
	if b.GainDB == 0 && b.PhaseDeg == 0 {
		return nil
	}
	f.MakeComplex(r)
	g := math.Pow(10, b.GainDB/20)
	s, c := math.Sincos(rad(b.PhaseDeg))
	gc, gs := g*c, g*s
	for n, x := range f.Samples {
		i, q := real(x), imag(x)
		f.Samples[n] = complex(i, gc*q-gs*i)
	}
	return nil
}

// DCOffset adds a constant I + jQ to every sample (carrier leakage, a converter's offset),
// in units of the frame's nominal RMS sample amplitude √(Es/SPS): DC(0.1, 0) puts a DC term
// 20 dB below the signal on I.
type DCOffset struct {
	I, Q float64 // offsets on I and Q, relative to √(Es/SPS)
}

// DC is a DC offset of i + jq relative to the nominal RMS sample amplitude.
func DC(i, q float64) *DCOffset { return &DCOffset{I: i, Q: q} }

// Name is "impair.DC".
func (b *DCOffset) Name() string { return "impair.DC" }

// Err reports an offset that is not a finite number.
func (b *DCOffset) Err() error {
	if !finite(b.I) || !finite(b.Q) {
		return fmt.Errorf("impair.DC: offset %v + j%v is not a finite number", b.I, b.Q)
	}
	return nil
}

// Process adds the offset; a zero offset leaves the frame untouched.
func (b *DCOffset) Process(f *link.Frame, r *rng.Stream) error {
	if b.I == 0 && b.Q == 0 {
		return nil
	}
	if b.Q != 0 {
		f.MakeComplex(r) // the signal leaves the real axis
	}
	a := rmsAmplitude(f)
	d := complex(a*b.I, a*b.Q)
	for n := range f.Samples {
		f.Samples[n] += d
	}
	return nil
}
