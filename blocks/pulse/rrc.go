package pulse

import (
	"fmt"
	"math"

	"tally/blocks/link"
	"tally/blocks/rng"
)

// RootRaisedCosine is the root-raised-cosine pulse of roll-off β, truncated to Span symbols
// and sampled at SPS samples per symbol (Span·SPS + 1 taps, centred). With τ = t/T,
//
//	g(τ) = [sin(πτ(1−β)) + 4βτ·cos(πτ(1+β))] / [πτ·(1 − (4βτ)²)],
//	g(0) = 1 − β + 4β/π,
//	g(±1/(4β)) = β/√2 · [(1 + 2/π)·sin(π/(4β)) + (1 − 2/π)·cos(π/(4β))]
//
// (Proakis, Digital Communications, 4th ed., 2001, ch. 9; the limits are the usual ones,
// common practice), scaled so that Σ g² = 1. The pulse convolved with itself is, up to the
// truncation, the raised-cosine Nyquist pulse: no intersymbol interference at the symbol
// instants. Its bandwidth is (1+β)/(2T).
type RootRaisedCosine struct {
	Rolloff float64 // excess bandwidth β, 0 … 1
	Symbols int     // span: length of the truncated pulse in symbol periods (even)
	Rate    int     // samples per symbol

	taps []float64
	err  error
}

// RRC is the root-raised-cosine pulse of roll-off beta (0 … 1), by default 10 symbols long at 4
// samples per symbol. Its Shape and Match are the transmit and receive filters.
func RRC(beta float64) *RootRaisedCosine {
	p := &RootRaisedCosine{Rolloff: beta, Symbols: 10, Rate: 4}
	if !(beta >= 0 && beta <= 1) {
		p.err = fmt.Errorf("pulse.RRC: roll-off %v must lie in [0, 1]", beta)
	}
	p.update()
	return p
}

// update computes the taps once per setting, so that a pulse shared between workers is only
// read while the link runs.
func (p *RootRaisedCosine) update() {
	p.taps = nil
	if p.err == nil {
		p.taps = rrcTaps(p.Rolloff, p.Symbols, p.Rate)
	}
}

// Span sets the length of the pulse in symbols (even, ≥ 2; default 10).
func (p *RootRaisedCosine) Span(symbols int) *RootRaisedCosine {
	p.Symbols = symbols
	if (symbols < 2 || symbols%2 != 0) && p.err == nil {
		p.err = fmt.Errorf("pulse.RRC: span %d symbols must be even and ≥ 2", symbols)
	}
	p.update()
	return p
}

// SPS sets the samples per symbol (≥ 2; default 4).
func (p *RootRaisedCosine) SPS(n int) *RootRaisedCosine {
	p.Rate = n
	if n < 2 && p.err == nil {
		p.err = fmt.Errorf("pulse.RRC: SPS = %d must be ≥ 2", n)
	}
	p.update()
	return p
}

// Err reports a bad parameter.
func (p *RootRaisedCosine) Err() error { return p.err }

// Taps are the filter's Span·SPS + 1 unit-energy taps.
func (p *RootRaisedCosine) Taps() []float64 { return p.taps }

// Value is the unscaled pulse g(τ) at τ = t/T symbol periods.
func (p *RootRaisedCosine) Value(tau float64) float64 { return rrc(p.Rolloff, tau) }

func rrc(b, t float64) float64 {
	switch {
	case t == 0:
		return 1 - b + 4*b/math.Pi
	case b > 0 && math.Abs(math.Abs(t)-1/(4*b)) < 1e-9:
		a := math.Pi / (4 * b)
		return b / math.Sqrt2 * ((1+2/math.Pi)*math.Sin(a) + (1-2/math.Pi)*math.Cos(a))
	}
	x := 4 * b * t
	return (math.Sin(math.Pi*t*(1-b)) + x*math.Cos(math.Pi*t*(1+b))) / (math.Pi * t * (1 - x*x))
}

func rrcTaps(b float64, span, sps int) []float64 {
	n := span*sps + 1
	h := make([]float64, n)
	d := span * sps / 2
	var e float64
	for i := range h {
		h[i] = rrc(b, float64(i-d)/float64(sps))
		e += h[i] * h[i]
	}
	s := 1 / math.Sqrt(e)
	for i := range h {
		h[i] *= s
	}
	return h
}

// Shape is the transmit filter: it upsamples the symbols to SPS samples per symbol and filters
// them with the pulse, tails included (see the package doc).
func (p *RootRaisedCosine) Shape() *Shaper {
	return &Shaper{Pulse: p, Block: "pulse.Shape"}
}

// Match is the receive (matched) filter, the same pulse; it keeps the sample rate.
func (p *RootRaisedCosine) Match() *Matched {
	return &Matched{Pulse: p, Block: "pulse.Match"}
}

// Shaper upsamples and filters: y[n] = Σₖ a[k]·g[n − k·SPS], n = 0 … (N−1)·SPS + len(g) − 1.
type Shaper struct {
	Pulse *RootRaisedCosine
	Block string
	out   []complex128
}

// Name is the block's name.
func (s *Shaper) Name() string { return s.Block }

// Err reports a bad pulse parameter.
func (s *Shaper) Err() error { return s.Pulse.Err() }

// Process shapes the frame's symbols; it expects one sample per symbol.
func (s *Shaper) Process(f *link.Frame, r *rng.Stream) error {
	if f.SPS > 1 {
		return fmt.Errorf("input already has %d samples per symbol", f.SPS)
	}
	g := s.Pulse.Taps()
	sps := s.Pulse.Rate
	x := f.Samples
	if len(x) == 0 {
		f.SPS = sps
		return nil
	}
	n := (len(x)-1)*sps + len(g)
	s.out = link.GrowComplex(s.out, n)
	y := s.out
	clear(y)
	for k, a := range x {
		o := y[k*sps : k*sps+len(g)]
		if imag(a) == 0 {
			ar := real(a)
			for j, v := range g {
				o[j] += complex(ar*v, 0)
			}
			continue
		}
		for j, v := range g {
			o[j] += a * complex(v, 0)
		}
	}
	if f.Symbols == 0 {
		f.Symbols = len(x)
	}
	f.Samples, f.SPS = y, sps
	return nil
}

// Matched filters with the pulse (its own time reverse, being symmetric), tails included.
type Matched struct {
	Pulse *RootRaisedCosine
	Block string
	out   []complex128
}

// Name is the block's name.
func (m *Matched) Name() string { return m.Block }

// Err reports a bad pulse parameter.
func (m *Matched) Err() error { return m.Pulse.Err() }

// Process filters the frame: y = x ∗ g, len(x) + len(g) − 1 samples.
func (m *Matched) Process(f *link.Frame, r *rng.Stream) error {
	g := m.Pulse.Taps()
	x := f.Samples
	if len(x) == 0 {
		return nil
	}
	m.out = link.GrowComplex(m.out, len(x)+len(g)-1)
	y := m.out
	clear(y)
	if f.Real {
		for i, a := range x {
			ar := real(a)
			o := y[i : i+len(g)]
			for j, v := range g {
				o[j] += complex(ar*v, 0)
			}
		}
	} else {
		for i, a := range x {
			o := y[i : i+len(g)]
			for j, v := range g {
				o[j] += a * complex(v, 0)
			}
		}
	}
	f.Samples = y
	if f.Estimator == link.SemiAnalytic {
		// White noise of variance v per sample leaves the filter with v·Σg² per sample.
		var e float64
		for _, v := range g {
			e += v * v
		}
		f.NoiseVar *= e
	}
	return nil
}

// Nature declares the matched filter a linear filter to the estimators.
func (m *Matched) Nature() link.Kind { return link.LinearFilter }
