package channel

import (
	"fmt"
	"math"
	"math/cmplx"

	"tally/blocks/link"
	"tally/blocks/rng"
)

// Fading is a flat (frequency-nonselective) fading channel: it multiplies the signal by a
// complex gain h and writes the gain of every symbol to f.Gain for receivers with perfect
// channel knowledge (see KnownGain). It adds no noise: put channel.AWGN after it,
//
//	link.Chain(src, mod, channel.Rayleigh(), channel.AWGN(ebn0), channel.KnownGain(), demod)
//
// The gain is Rician with factor K (power of the line-of-sight path over the scattered power,
// linear; K = 0 is Rayleigh),
//
//	h = √(K/(K+1))·e^{j(2π fD·cos θ0·t + φ0)} + √(1/(K+1))·g,   g ~ CN(0, 1),
//
// so E|h|² = 1: the Eb/N0 of the AWGN block after it is the average received Eb/N0.
//
// How h changes with time is one of
//   - per symbol (the default, Hold(1)): independent gains, ideal interleaving;
//   - block fading, Hold(n): one gain for n symbols; Hold(0) (PerFrame) one gain per frame;
//   - time-correlated, Doppler(fD·T): g is the sum-of-sinusoids process of Xiao, Zheng and
//     Beaulieu ("Novel sum-of-sinusoids simulation models for Rayleigh and Rician fading
//     channels", IEEE Trans. Wireless Commun., 2006),
//     g(t) = (1/√M)·Σₙ exp(j(2π fD t cos αₙ + φₙ)), αₙ = (2πn + θₙ)/M, n = 1…M,
//     with θₙ, φₙ uniform; its autocorrelation E[g(t)g*(t+τ)] is J0(2π fD τ), the Jakes
//     (Clarke) spectrum, and its first-order law tends to CN(0,1) as M grows (M = 32 here).
//
// The line-of-sight phase φ0 is drawn once per frame; in the time-correlated model the
// line-of-sight path also carries the Doppler shift fD·cos θ0 (θ0 = Angle, its angle of arrival
// to the direction of motion). Every frame draws a fresh stationary state (new phases and
// angles) from its own stream, so frames are independent.
//
// Oversampled signals (after a pulse shaper, SPS > 1): the time-correlated process is
// evaluated at every sample; per-symbol and block gains are held over each symbol's SPS
// samples. f.Gain still holds one gain per symbol, the gain at the symbol's centre, found on
// the convention that the symbols are centred in the frame (symbol k at sample
// Lead + k·SPS, Lead = (len(Samples) − 1 − (Symbols−1)·SPS)/2, as pulse.Shape leaves them;
// see pulse.Lead).
type Fading struct {
	K         float64 // Rician factor, linear (0: Rayleigh)
	Angle     float64 // angle of arrival of the line-of-sight path to the motion, radians
	FD        float64 // maximum Doppler frequency times the symbol period, fD·T (0: not time-correlated)
	Coherence int     // symbols per independent gain when FD = 0: 1 per symbol, 0 the whole frame
	M         int     // sinusoids of the time-correlated model
	Block     string  // name in messages

	err   error
	gain  []complex128
	phase []complex128 // per-sinusoid phasors and their steps (time-correlated model)
	step  []complex128
}

// Rayleigh is flat Rayleigh fading, a new gain every symbol; see Fading.
func Rayleigh() *Fading { return &Fading{Coherence: 1, M: 32, Block: "channel.Rayleigh"} }

// Rician is flat Rician fading with factor k (line-of-sight over scattered power, linear, ≥ 0),
// a new gain every symbol; see Fading.
func Rician(k float64) *Fading {
	c := &Fading{K: k, Coherence: 1, M: 32, Block: "channel.Rician"}
	if !(k >= 0) || math.IsInf(k, 0) {
		c.err = fmt.Errorf("%s: K = %v is not a finite number ≥ 0", c.Block, k)
	}
	return c
}

// RicianDB is Rician fading with the factor given in dB.
func RicianDB(kdB float64) *Fading {
	c := Rician(math.Pow(10, kdB/10))
	c.Block = "channel.RicianDB"
	if math.IsNaN(kdB) || math.IsInf(kdB, 1) {
		c.err = fmt.Errorf("%s: K = %v dB is not a finite number", c.Block, kdB)
	} else {
		c.err = nil
	}
	return c
}

// Doppler makes the fading time-correlated with maximum Doppler frequency fdT, normalised to
// the symbol rate (fD·T, e.g. 0.01: the gain decorrelates over about 1/(2π·0.01)·2.4 ≈ 38
// symbols). It replaces Hold.
func (c *Fading) Doppler(fdT float64) *Fading {
	c.FD = fdT
	if !(fdT >= 0 && fdT <= 1) {
		c.fail("Doppler fD·T = %v must lie in [0, 1]", fdT)
	}
	return c
}

// Hold makes block fading: one gain for every n symbols (n = 0: the whole frame).
// It replaces Doppler.
func (c *Fading) Hold(n int) *Fading {
	c.Coherence, c.FD = n, 0
	if n < 0 {
		c.fail("Hold = %d symbols must be ≥ 0", n)
	}
	return c
}

// PerFrame is block fading with one gain per frame, Hold(0).
func (c *Fading) PerFrame() *Fading { return c.Hold(0) }

// LOSAngle sets the angle of arrival of the line-of-sight path, in degrees from the direction
// of motion (default 0: the full Doppler shift fD). It matters only with K > 0 and Doppler.
func (c *Fading) LOSAngle(deg float64) *Fading {
	c.Angle = deg * math.Pi / 180
	if math.IsNaN(deg) || math.IsInf(deg, 0) {
		c.fail("LOS angle %v° is not a finite number", deg)
	}
	return c
}

// Sinusoids sets the number of sinusoids M of the time-correlated model (default 32).
func (c *Fading) Sinusoids(m int) *Fading {
	c.M = m
	if m < 4 {
		c.fail("Sinusoids M = %d must be ≥ 4", m)
	}
	return c
}

func (c *Fading) fail(format string, a ...any) {
	if c.err == nil {
		c.err = fmt.Errorf("%s: "+format, append([]any{c.Block}, a...)...)
	}
}

// Name is the constructor's name.
func (c *Fading) Name() string { return c.Block }

// Err reports a bad parameter.
func (c *Fading) Err() error { return c.err }

// symbolLead is the sample index of symbol 0's centre in a frame of n samples holding symbols
// symbols at sps samples per symbol, on the convention that pulse shapers and matched filters
// pad the frame symmetrically (0 at one sample per symbol).
func symbolLead(n, symbols, sps int) int {
	if sps < 1 {
		sps = 1
	}
	l := (n - 1 - (symbols-1)*sps) / 2
	return max(l, 0)
}

// Process applies the gain and records it in f.Gain.
func (c *Fading) Process(f *link.Frame, r *rng.Stream) error {
	sps := max(f.SPS, 1)
	n := f.Symbols
	if n <= 0 {
		n = len(f.Samples) / sps
	}
	f.MakeComplex(r) // a complex gain mixes I and Q
	c.gain = link.GrowComplex(c.gain, n)
	f.Gain = c.gain
	if len(f.Samples) == 0 || n == 0 {
		return nil
	}
	lead := symbolLead(len(f.Samples), n, sps)
	los := math.Sqrt(c.K / (c.K + 1))
	scat := math.Sqrt(1 / (c.K + 1))
	phi0 := 2 * math.Pi * r.Float64()
	if c.FD > 0 {
		c.correlated(f.Samples, r, lead, sps, los, scat, phi0)
		return nil
	}
	// Independent gains, one per block of hold symbols.
	hold := c.Coherence
	if hold <= 0 || hold > n {
		hold = n
	}
	lo := complex(los*math.Cos(phi0), los*math.Sin(phi0))
	s := scat * math.Sqrt(0.5)
	var h complex128
	for k := range n {
		if k%hold == 0 {
			h = lo + complex(s*r.Norm(), s*r.Norm())
		}
		c.gain[k] = h
	}
	x := f.Samples
	if sps == 1 && len(x) == n {
		for i := range x {
			x[i] *= c.gain[i]
		}
		return nil
	}
	for i := range x {
		k := (i - lead + sps/2) / sps
		if i-lead+sps/2 < 0 {
			k = 0
		}
		x[i] *= c.gain[min(k, n-1)]
	}
	return nil
}

// correlated applies the sum-of-sinusoids process, evaluated at every sample by rotating one
// phasor per sinusoid (exact up to rounding, renormalised now and then).
func (c *Fading) correlated(x []complex128, r *rng.Stream, lead, sps int, los, scat, phi0 float64) {
	m := max(c.M, 4)
	c.phase = link.GrowComplex(c.phase, m+1)
	c.step = link.GrowComplex(c.step, m+1)
	w := 2 * math.Pi * c.FD / float64(sps) // radians per sample at the maximum Doppler
	t0 := -float64(lead)                   // sample 0 lies lead samples before symbol 0
	for i := range m {
		theta := math.Pi * (2*r.Float64() - 1)
		phi := math.Pi * (2*r.Float64() - 1)
		alpha := (2*math.Pi*float64(i+1) + theta) / float64(m)
		d := w * math.Cos(alpha)
		c.phase[i] = cmplx.Rect(1, phi+d*t0)
		c.step[i] = cmplx.Rect(1, d)
	}
	d0 := w * math.Cos(c.Angle)
	c.phase[m] = cmplx.Rect(1, phi0+d0*t0)
	c.step[m] = cmplx.Rect(1, d0)
	g := complex(scat/math.Sqrt(float64(m)), 0)
	lo := complex(los, 0)
	n := len(c.gain)
	p, st := c.phase[:m], c.step[:m]
	for i := range x {
		var sum complex128
		for j := range p {
			sum += p[j]
			p[j] *= st[j]
		}
		h := g*sum + lo*c.phase[m]
		c.phase[m] *= c.step[m]
		x[i] *= h
		if k := i - lead; k >= 0 && k%sps == 0 && k/sps < n {
			c.gain[k/sps] = h
		}
		if i&1023 == 1023 { // keep the phasors on the unit circle
			for j := range c.phase {
				c.phase[j] /= complex(cmplx.Abs(c.phase[j]), 0)
			}
		}
	}
}

// Nature declares per-symbol and time-correlated fading to the estimators (refused: the errors
// come from the fades); block and per-frame fading are fixed gains within their block.
func (c *Fading) Nature() link.Kind {
	if c.FD > 0 || c.Coherence == 1 {
		return link.SymbolFading
	}
	return link.Undeclared
}
