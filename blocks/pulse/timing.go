package pulse

import (
	"fmt"
	"math"

	"tally/blocks/link"
	"tally/blocks/rng"
)

// TimingOffset delays an oversampled signal by a fraction of a symbol and lets that delay
// drift, as a receiver whose sampling clock is offset in phase and in frequency sees it:
//
//	y[n] = x(n − τₙ),   τₙ = SPS·Offset + PPM·10⁻⁶·(n − Lead)   (samples),
//
// so symbol 0 is late by Offset symbol periods and every symbol after it by another PPM·10⁻⁶
// of a period (a receiver clock slow by PPM parts per million). x between samples is the cubic
// Lagrange interpolant through the four nearest samples, evaluated in Farrow form (Erup,
// Gardner and Harris, "Interpolation in digital modems — Part II: implementation and
// performance", IEEE Trans. Commun., 1993); samples outside the frame read as zero. The frame
// keeps its length. Cubic interpolation is accurate only on an oversampled signal: put it
// between pulse.Shape and the matched filter (SPS ≥ 4 keeps its error below about −40 dB
// for an RRC signal).
type TimingOffset struct {
	Offset float64 // delay of symbol 0, symbol periods (positive: late)
	PPM    float64 // sampling-clock frequency offset, parts per million (positive: slow)
	Block  string  // name in messages

	out []complex128
	err error
}

// Timing delays the signal by offset symbol periods (fractional, e.g. 0.25); see TimingOffset.
func Timing(offset float64) *TimingOffset {
	t := &TimingOffset{Offset: offset, Block: "pulse.Timing"}
	if math.IsNaN(offset) || math.IsInf(offset, 0) {
		t.err = fmt.Errorf("pulse.Timing: offset %v symbols is not a finite number", offset)
	}
	return t
}

// Drift sets the sampling-clock frequency offset in parts per million.
func (t *TimingOffset) Drift(ppm float64) *TimingOffset {
	t.PPM = ppm
	if (math.IsNaN(ppm) || math.IsInf(ppm, 0)) && t.err == nil {
		t.err = fmt.Errorf("pulse.Timing: drift %v ppm is not a finite number", ppm)
	}
	return t
}

// Name is the block's name.
func (t *TimingOffset) Name() string { return t.Block }

// Err reports a bad parameter.
func (t *TimingOffset) Err() error { return t.err }

// Process resamples the frame.
func (t *TimingOffset) Process(f *link.Frame, r *rng.Stream) error {
	sps := max(f.SPS, 1)
	x := f.Samples
	n := len(x)
	t.out = link.GrowComplex(t.out, n)
	lead := float64(Lead(n, f.Symbols, sps))
	d0 := float64(sps) * t.Offset
	rate := t.PPM * 1e-6
	at := func(i int) complex128 {
		if i < 0 || i >= n {
			return 0
		}
		return x[i]
	}
	for i := range t.out {
		pos := float64(i) - d0 - rate*(float64(i)-lead)
		b := math.Floor(pos)
		mu := pos - b
		k := int(b)
		t.out[i] = farrowCubic(at(k-1), at(k), at(k+1), at(k+2), mu)
	}
	f.Samples = t.out
	return nil
}

// farrowCubic is the cubic Lagrange interpolant through x(−1), x(0), x(1), x(2) at 0 ≤ μ < 1,
// as a polynomial in μ with sample-combination coefficients (the Farrow structure).
func farrowCubic(xm1, x0, x1, x2 complex128, mu float64) complex128 {
	c0 := x0
	c1 := -xm1/3 - x0/2 + x1 - x2/6
	c2 := (xm1+x1)/2 - x0
	c3 := (x2-xm1)/6 + (x0-x1)/2
	m := complex(mu, 0)
	return ((c3*m+c2)*m+c1)*m + c0
}
