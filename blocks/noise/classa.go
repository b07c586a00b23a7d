package noise

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/stat/distuv"

	"tally/blocks/channel"
	"tally/blocks/link"
	"tally/blocks/rng"
)

// ClassANoise is Middleton's Class A noise (Middleton, "Statistical-physical models of
// electromagnetic interference", IEEE Trans. Electromagn. Compat., 1977): a Gaussian
// background plus a Poisson number of overlapping impulses. Per sample, a state m is drawn
// from the Poisson law P_m = e^{−A}·A^m/m! and the noise is circular complex Gaussian of
// variance
//
//	σ_m² = N0 · (m/A + Γ)/(1 + Γ),
//
// so the total variance Σ P_m σ_m² is N0. The impulsive index A (> 0) is the mean number of
// impulses overlapping at any instant: small A is strongly impulsive, large A tends to
// Gaussian. Γ (> 0) is the ratio of Gaussian to impulsive power, σ_G²/σ_I²; Γ = +Inf is pure
// Gaussian noise (this block is then channel.AWGN). Each real dimension has the density
// ClassAPDF with variance N0/2; the states of successive samples are independent
// (memoryless Class A).
type ClassANoise struct {
	Level channel.WhiteNoise // the noise level, set like channel.AWGN's
	A     float64            // impulsive index
	Gamma float64            // Gaussian-to-impulsive power ratio Γ (linear)

	tA, tG float64   // parameters the tables were built for
	cdf    []float64 // cumulative Poisson weights, up to a tail below 1e-16
	scale  []float64 // √((m/A + Γ)/(1 + Γ)) per state
}

// ClassA is Class A noise at ebn0 dB of Eb/N0 with impulsive index a and Gaussian-to-impulsive
// power ratio gamma.
func ClassA(ebn0, a, gamma float64) *ClassANoise {
	return &ClassANoise{Level: channel.WhiteNoise{DB: ebn0, By: channel.EbN0, Block: "noise.ClassA"}, A: a, Gamma: gamma}
}

// By says which ratio the level states (channel.EbN0, channel.EsN0 or channel.SNR).
func (c *ClassANoise) By(l channel.Level) *ClassANoise { c.Level.By = l; return c }

// Name is "noise.ClassA".
func (c *ClassANoise) Name() string { return c.Level.Block }

// Err reports a bad level, A or Γ.
func (c *ClassANoise) Err() error {
	if err := c.Level.Err(); err != nil {
		return err
	}
	if !finite(c.A) || c.A <= 0 {
		return fmt.Errorf("%s: impulsive index A = %v must be positive", c.Name(), c.A)
	}
	if math.IsNaN(c.Gamma) || c.Gamma <= 0 {
		return fmt.Errorf("%s: Γ = %v must be positive (+Inf for Gaussian noise)", c.Name(), c.Gamma)
	}
	return nil
}

// ClassAPDF is the density of one real dimension of Class A noise of variance v (N0/2 for the
// channel above):
//
//	p(x) = Σ_m e^{−A}·A^m/m! · exp(−x²/(2σ_m²)) / √(2π σ_m²),   σ_m² = v·(m/A + Γ)/(1 + Γ),
//
// summed until the Poisson weights left are below 1e-16 (Middleton, 1977; the same form in
// Spaulding and Middleton, "Optimum reception in an impulsive interference environment",
// IEEE Trans. Commun., 1977).
func ClassAPDF(x, a, gamma, v float64) float64 {
	if math.IsInf(gamma, 1) {
		return distuv.Normal{Mu: 0, Sigma: math.Sqrt(v)}.Prob(x)
	}
	var p, w float64
	w = math.Exp(-a) // P_0
	left := 1.0
	for m := 0; ; m++ {
		s2 := v * (float64(m)/a + gamma) / (1 + gamma)
		p += w * math.Exp(-x*x/(2*s2)) / math.Sqrt(2*math.Pi*s2)
		left -= w
		if left < 1e-16 && float64(m) > a {
			return p
		}
		w *= a / float64(m+1)
	}
}

// tables builds the state sampler for the current A and Γ.
func (c *ClassANoise) tables() {
	if c.cdf != nil && c.tA == c.A && c.tG == c.Gamma {
		return
	}
	c.tA, c.tG = c.A, c.Gamma
	c.cdf, c.scale = c.cdf[:0], c.scale[:0]
	pois := distuv.Poisson{Lambda: c.A}
	for m := 0; ; m++ {
		cm := pois.CDF(float64(m))
		c.cdf = append(c.cdf, cm)
		c.scale = append(c.scale, math.Sqrt((float64(m)/c.A+c.Gamma)/(1+c.Gamma)))
		if 1-cm < 1e-16 && float64(m) > c.A {
			break
		}
	}
}

// Process adds the noise and sets f.N0.
func (c *ClassANoise) Process(f *link.Frame, r *rng.Stream) error {
	if math.IsInf(c.Gamma, 1) {
		return c.Level.Process(f, r)
	}
	n0, ok := level(&c.Level, f)
	if !ok {
		return errors.New(errNoModulator)
	}
	c.tables()
	f.MakeComplex(r)
	f.N0 = n0
	sigma := math.Sqrt(n0 / 2)
	g := r.Rand()
	last := len(c.cdf) - 1
	for i := range f.Samples {
		u := r.Float64()
		m := 0
		for m < last && u >= c.cdf[m] { // a tail beyond the table (< 1e-16) takes the last state
			m++
		}
		s := sigma * c.scale[m]
		f.Samples[i] += complex(s*g.NormFloat64(), s*g.NormFloat64())
	}
	return nil
}

// Nature declares the noise non-Gaussian to the estimators, which refuse it.
func (c *ClassANoise) Nature() link.Kind { return link.NonGaussian }
