package modem

import (
	"fmt"
	"math"

	"tally/blocks/link"
)

// Nature declares the detector to the estimators.
func (d *Detector) Nature() link.Kind { return link.Detector }

// CheckEstimator says which estimators the detector serves. Importance sampling needs a
// decision made on one symbol's sample alone: every coherent scheme but the differentially
// encoded ones and BFSK (two samples per symbol). The semi-analytic estimator needs decision
// boundaries the Gaussian tail can be integrated over exactly: the axis schemes (BPSK, QPSK,
// M-PAM, square M-QAM) with hard decisions and no CSI.
func (d *Detector) CheckEstimator(e link.Estimator) error {
	k := d.m.kind
	switch e {
	case link.Importance:
		switch k {
		case kindAxis, kindPSK, kindOOK:
			return nil
		}
		return fmt.Errorf("%s decides on more than one sample per symbol: importance sampling weighs one symbol's noise per decision; run plain Monte Carlo", d.m.Scheme)
	case link.SemiAnalytic:
		switch {
		case k != kindAxis:
			return fmt.Errorf("%s has decision regions the semi-analytic estimator does not integrate exactly (it serves BPSK, QPSK, PAM and square QAM); use importance sampling or plain Monte Carlo", d.m.Scheme)
		case d.Soft != NoLLR:
			return fmt.Errorf("the semi-analytic estimator integrates the hard decision regions; drop the soft output")
		case d.UseGain:
			return fmt.Errorf("the semi-analytic estimator does not serve CSI detection; use importance sampling or plain Monte Carlo")
		}
	}
	return nil
}

// flips sets f.Flip for the semi-analytic estimator: for each bit of the noise-free hard
// decision, the probability that Gaussian noise of variance f.NoiseVar per dimension changes
// it. On an axis with levels d·(L−1−2i) the decision regions are the intervals between the
// midpoints d·(L−2i); the noise-free value x lies in region c, and bit j flips when x + n falls
// in a region whose label differs in bit j:
//
//	P(flip of bit j) = Σ_{i: bit j of label i ≠ bit j of label c} P(x + n ∈ region i),
//
// each term a difference of two Gaussian tails Q(t) = ½·erfc(t/√2) taken on the far side of x,
// so probabilities down to 1e-300 keep their relative precision.
func (d *Detector) flips(f *link.Frame, y []complex128) error {
	if !(f.NoiseVar > 0) {
		return fmt.Errorf("semi-analytic estimation needs the variance of the noise left out (is a channel.AWGN before the detector?)")
	}
	m := d.m
	a := &m.axis
	k, h := m.Bits, a.bits
	d.flip = link.GrowFloats(d.flip, len(y)*k)
	f.Flip = d.flip
	s := math.Sqrt(f.NoiseVar)
	for i, v := range y {
		a.flips(real(v), s, f.Flip[i*k:i*k+h])
		if m.axes == 2 {
			a.flips(imag(v), s, f.Flip[i*k+h:i*k+k])
		}
	}
	return nil
}

// q is the Gaussian tail Q(t) = P(N(0,1) > t).
func q(t float64) float64 { return 0.5 * math.Erfc(t/math.Sqrt2) }

// flips writes, for each of the axis's bits, the probability that noise of standard deviation
// s moves x into a region whose label differs in that bit from the region x lies in.
func (a *axis) flips(x, s float64, dst []float64) {
	L := a.L
	c := a.sliceIndex(x)
	lc := a.labels[c]
	clear(dst)
	for i := range L {
		if i == c {
			continue
		}
		// Region i is (lo, hi], hi = d(L−2i) (∞ for i = 0), lo = d(L−2i−2) (−∞ for i = L−1).
		var p float64
		if i < c { // above x
			lo := a.d * float64(L-2*i-2)
			p = q((lo - x) / s)
			if i > 0 {
				p -= q((a.d*float64(L-2*i) - x) / s)
			}
		} else { // below x
			hi := a.d * float64(L-2*i)
			p = q((x - hi) / s)
			if i < L-1 {
				p -= q((x - a.d*float64(L-2*i-2)) / s)
			}
		}
		diff := a.labels[i] ^ lc
		for j := range dst {
			if diff>>uint(a.bits-1-j)&1 == 1 {
				dst[j] += p
			}
		}
	}
}
