package channel

import (
	"fmt"
	"math"

	"tally/blocks/link"
	"tally/blocks/rng"
)

// Bias sets the mean translation importance sampling uses, per real dimension, in the
// signal's amplitude (Es = 1 after a modulator); 0 (the default) chooses half the minimum
// distance of the frame's constellation, the distance from a point to its nearest decision
// boundary. It has no effect unless the link estimates by importance sampling.
func (c *WhiteNoise) Bias(shift float64) *WhiteNoise { c.Shift = shift; return c }

// Nature declares the block as the Gaussian noise the estimators work on.
func (c *WhiteNoise) Nature() link.Kind { return link.GaussianNoise }

// biasing is the scratch of importance sampling, kept between frames.
type biasing struct {
	noise  []float64
	signs  []byte
	weight []float64
	points []complex128 // the constellation the automatic shift was found for
	half   float64      // its half minimum distance
}

// biased adds importance-sampling noise, drawn per real dimension from a mixture that
// translates the mean toward the decision boundaries on either side (Lu and Yao, "Improved
// importance sampling technique for efficient simulation of digital communication systems",
// IEEE JSAC, 1988, translate the mean to the boundary; the two-sided mixture serves inner
// points of a constellation, which have boundaries on both sides, without knowing the symbol
// sent). For a real signal (one dimension) the mixture is ½N(+d, σ²) + ½N(−d, σ²), with the
// likelihood ratio, true density over biased density, of a noise value n
//
//	w(n) = φ(n/σ) / (½φ((n−d)/σ) + ½φ((n+d)/σ)) = exp(d²/2σ²) / cosh(n·d/σ²).
//
// For a complex signal each dimension keeps an unshifted component, ½N(0, σ²) + ¼N(±d, σ²),
// so that an error in one dimension is not weighed down by a shift of the other (without it
// the weights of 16-QAM degenerate); then
//
//	w(n) = 1 / (½ + ½·exp(−d²/2σ²)·cosh(n·d/σ²)) ≤ 2.
//
// A symbol's weight is the product over its dimensions (a real signal's imaginary noise stays
// unbiased and pending). Frame.Weight gets one weight per symbol, so the noise must be added
// at one sample per symbol.
func (c *WhiteNoise) biased(f *link.Frame, r *rng.Stream, sigma float64) error {
	if f.SPS != 1 {
		return fmt.Errorf("importance sampling weighs one noise sample per symbol, the frame has %d samples per symbol (use the semi-analytic estimator after a pulse shaper)", f.SPS)
	}
	d := c.Shift
	if d == 0 {
		d = c.bias.automatic(f)
		if !(d > 0) {
			return fmt.Errorf("importance sampling: no constellation in the frame to choose the shift from; set it with .Bias(shift)")
		}
	}
	n := len(f.Samples)
	b := &c.bias
	b.weight = link.GrowFloats(b.weight, n)
	f.Weight = b.weight
	k := d / (sigma * sigma)
	h := d * k / 2 // d²/2σ²
	if f.Real {
		b.noise = link.GrowFloats(b.noise, n)
		b.signs = link.GrowBytes(b.signs, n)
		r.Normals(b.noise, sigma)
		r.Bits(b.signs)
		for i := range f.Samples {
			x := b.noise[i] + d*(1-2*float64(b.signs[i]))
			f.Samples[i] += complex(x, 0)
			f.Weight[i] = math.Exp(h - logCosh(x*k))
		}
		f.PendingImagSigma = sigma
		return nil
	}
	b.noise = link.GrowFloats(b.noise, 2*n)
	b.signs = link.GrowBytes(b.signs, 4*n)
	r.Normals(b.noise, sigma)
	r.Bits(b.signs)
	for i := range f.Samples {
		x := b.noise[2*i] + d*shift3(b.signs[4*i], b.signs[4*i+1])
		y := b.noise[2*i+1] + d*shift3(b.signs[4*i+2], b.signs[4*i+3])
		f.Samples[i] += complex(x, y)
		f.Weight[i] = ratio3(x*k, h) * ratio3(y*k, h)
	}
	return nil
}

// shift3 maps two fair bits to the mixture's mean: 0 with probability ½, ±1 with ¼ each.
func shift3(a, b byte) float64 {
	if a == 1 {
		return 0
	}
	return 1 - 2*float64(b)
}

// ratio3 is 1/(½ + ½·e^a), a = logcosh(t) − h, computed without overflow.
func ratio3(t, h float64) float64 {
	a := logCosh(t) - h
	if a > 0 {
		e := math.Exp(-a)
		return 2 * e / (1 + e)
	}
	return 2 / (1 + math.Exp(a))
}

// logCosh is log(cosh(x)) without overflow: |x| + log1p(e^{−2|x|}) − log 2.
func logCosh(x float64) float64 {
	a := math.Abs(x)
	return a + math.Log1p(math.Exp(-2*a)) - math.Ln2
}

// automatic is half the minimum distance between the points of the frame's constellation,
// scaled to the frame's symbol energy; 0 when the frame has none.
func (b *biasing) automatic(f *link.Frame) float64 {
	pts := f.Constellation
	if len(pts) < 2 {
		return 0
	}
	if len(b.points) != len(pts) || &b.points[0] != &pts[0] {
		m := math.Inf(1)
		for i := range pts {
			for j := i + 1; j < len(pts); j++ {
				dr, di := real(pts[i])-real(pts[j]), imag(pts[i])-imag(pts[j])
				m = min(m, dr*dr+di*di)
			}
		}
		b.points, b.half = pts, math.Sqrt(m)/2
	}
	es := f.Es
	if es <= 0 {
		es = 1
	}
	return b.half * math.Sqrt(es)
}
