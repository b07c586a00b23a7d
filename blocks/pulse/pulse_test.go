package pulse_test

import (
	"math"
	"math/cmplx"
	"strings"
	"testing"

	"tally/blocks/channel"
	"tally/blocks/internal/linktest"
	"tally/blocks/link"
	"tally/blocks/pulse"
	"tally/blocks/rng"
)

func conv(a, b []float64) []float64 {
	y := make([]float64, len(a)+len(b)-1)
	for i, x := range a {
		for j, v := range b {
			y[i+j] += x * v
		}
	}
	return y
}

// raisedCosine is the raised-cosine Nyquist pulse sinc(τ)·cos(πβτ)/(1 − (2βτ)²) (Proakis,
// Digital Communications, 4th ed., 2001, ch. 9), with its limit π/4·sinc(1/(2β)) at
// τ = ±1/(2β) (common practice).
func raisedCosine(b, t float64) float64 {
	sinc := func(x float64) float64 {
		if x == 0 {
			return 1
		}
		return math.Sin(math.Pi*x) / (math.Pi * x)
	}
	if b > 0 && math.Abs(math.Abs(t)-1/(2*b)) < 1e-9 {
		return math.Pi / 4 * sinc(1/(2*b))
	}
	return sinc(t) * math.Cos(math.Pi*b*t) / (1 - 4*b*b*t*t)
}

// The taps have unit energy, and RRC ∗ RRC is the raised-cosine pulse: Nyquist, no ISI at the
// symbol instants. The truncation to Span symbols leaves some ISI (the RRC's tails fall like
// 1/τ², common practice); the tolerances are engineering ones, no source: at the symbol
// instants the largest ISI term stays below 2 % of the peak (−34 dB) for span 8 and 0.5 %
// (−46 dB) for span 16, the sum of |ISI| below 5 % and 2 %; over the central half of the span
// RRC ∗ RRC matches the raised cosine within 0.001 (the untruncated product would be exact).
func TestRRCNyquist(t *testing.T) {
	for _, tc := range []struct {
		beta       float64
		span, sps  int
		worst, sum float64
	}{
		{0.35, 8, 4, 0.02, 0.05}, {0.35, 16, 8, 0.005, 0.02}, {0.5, 16, 4, 0.005, 0.02}, {0.22, 16, 4, 0.005, 0.02},
		{0.25, 16, 2, 0.005, 0.02}, // 1/(4β) = 1 symbol lands on a tap: the special case
	} {
		p := pulse.RRC(tc.beta).Span(tc.span).SPS(tc.sps)
		g := p.Taps()
		if len(g) != tc.span*tc.sps+1 {
			t.Fatalf("%d taps, want %d", len(g), tc.span*tc.sps+1)
		}
		e := 0.0
		for _, v := range g {
			e += v * v
		}
		if math.Abs(e-1) > 1e-12 {
			t.Errorf("β %v: tap energy %v, want 1", tc.beta, e)
		}
		rc := conv(g, g)
		c := len(rc) / 2
		if math.Abs(rc[c]-1) > 1e-12 {
			t.Errorf("β %v: peak %v, want 1", tc.beta, rc[c])
		}
		worst, sum := 0.0, 0.0
		for k := c % tc.sps; k < len(rc); k += tc.sps {
			if k != c {
				worst = math.Max(worst, math.Abs(rc[k]))
				sum += math.Abs(rc[k])
			}
		}
		if worst > tc.worst || sum > tc.sum {
			t.Errorf("β %v span %d: largest ISI %.5f (want < %v), Σ|ISI| %.5f (want < %v)", tc.beta, tc.span, worst, tc.worst, sum, tc.sum)
		}
		for i, v := range rc {
			tau := float64(i-c) / float64(tc.sps)
			if want := raisedCosine(tc.beta, tau); math.Abs(tau) < float64(tc.span)/4 && math.Abs(v-want) > 0.001 {
				t.Errorf("β %v span %d: RRC∗RRC(%v) = %.5f, raised cosine %.5f", tc.beta, tc.span, tau, v, want)
				break
			}
		}
	}
}

// Without noise, shape → match → sample returns every transmitted symbol at its own index,
// first and last included, within the truncation ISI (β 0.3, span 16: Σ|ISI| under 0.01 of
// the peak, times the largest symbol magnitude 2.1 of this 16-point grid: 0.02).
func TestAlignment(t *testing.T) {
	p := pulse.RRC(0.3).Span(16).SPS(8)
	f := link.Frame{SPS: 1, Symbols: 50, Es: 1}
	s := rng.New(3)
	a := make([]complex128, 50)
	for i := range a {
		a[i] = complex(float64(s.IntN(4))-1.5, float64(s.IntN(4))-1.5)
	}
	f.Samples = append([]complex128(nil), a...)
	for _, b := range []link.Block{p.Shape(), p.Match(), pulse.Sample()} {
		if err := b.Process(&f, s); err != nil {
			t.Fatal(err)
		}
	}
	if f.SPS != 1 || len(f.Samples) != 50 {
		t.Fatalf("SPS %d, %d samples; want 1 and 50", f.SPS, len(f.Samples))
	}
	for i := range a {
		if d := cmplx.Abs(f.Samples[i] - a[i]); d > 0.02 {
			t.Errorf("symbol %d: got %v, sent %v", i, f.Samples[i], a[i])
		}
	}
}

// Through the whole link with zero timing offset, BPSK BER must match the AWGN closed form
// Pb = ½·erfc(√(Eb/N0)) (Proakis, 2001, ch. 5) within the 99 % Clopper–Pearson interval: the
// unit-energy matched filter keeps Eb/N0.
func TestShapedBPSKMatchesAWGN(t *testing.T) {
	for _, tc := range []struct {
		db  float64
		sps int
	}{{2, 4}, {6, 2}, {4, 8}} {
		p := pulse.RRC(0.35).Span(12).SPS(tc.sps)
		l := link.Chain(&linktest.BPSK{N: 2048}, p.Shape(), channel.AWGN(tc.db), p.Match(), pulse.Sample(), &linktest.BPSKDetector{})
		e := linktest.Estimate(t, l, 150, 5)
		want := 0.5 * math.Erfc(math.Sqrt(math.Pow(10, tc.db/10)))
		if want < e.Low || want > e.High {
			t.Errorf("%v dB, SPS %d: BER %.5g, 99%% interval [%.5g, %.5g] misses %.5g", tc.db, tc.sps, e.Rate, e.Low, e.High, want)
		}
	}
}

// A timing error of half a symbol must cost a lot (common practice, no source: the eye is
// nearly closed there, ISI of order ±0.6 of the peak for β = 0.35), and an offset of a whole
// number of samples is undone exactly by the sampler's phase.
func TestTimingOffsetBER(t *testing.T) {
	p := pulse.RRC(0.35).Span(12).SPS(4)
	db := 6.0
	want := 0.5 * math.Erfc(math.Sqrt(math.Pow(10, db/10)))
	late := linktest.Estimate(t, link.Chain(&linktest.BPSK{N: 2048}, p.Shape(), pulse.Timing(0.5), channel.AWGN(db), p.Match(), pulse.Sample(), &linktest.BPSKDetector{}), 40, 6)
	if late.Low < 5*want {
		t.Errorf("half-symbol offset: BER %.4g, want far above the aligned %.4g", late.Rate, want)
	}
	fixed := linktest.Estimate(t, link.Chain(&linktest.BPSK{N: 2048}, p.Shape(), pulse.Timing(0.25), channel.AWGN(db), p.Match(), pulse.Sample().Phase(1), &linktest.BPSKDetector{}), 150, 6)
	if want < fixed.Low || want > fixed.High {
		t.Errorf("offset 1 sample, phase 1: BER %.5g, 99%% interval [%.5g, %.5g] misses %.5g", fixed.Rate, fixed.Low, fixed.High, want)
	}
}

// Cubic Lagrange interpolation is exact for cubic polynomials (a fact of interpolation,
// common practice), so delaying samples of a cubic gives the cubic at the delayed times;
// with drift the delay follows τₙ = SPS·Offset + PPM·10⁻⁶·(n − Lead) exactly.
func TestTimingInterpolatesCubics(t *testing.T) {
	cubic := func(x float64) float64 { return 0.002*x*x*x - 0.05*x*x + 0.3*x - 2 }
	const sps, symbols = 4, 40
	n := (symbols-1)*sps + 1
	for _, tc := range []struct{ off, ppm float64 }{{0.13, 0}, {-0.31, 0}, {0.2, 5000}, {0, -20000}} {
		f := link.Frame{SPS: sps, Symbols: symbols, Samples: make([]complex128, n)}
		for i := range f.Samples {
			f.Samples[i] = complex(cubic(float64(i)), -cubic(float64(i)))
		}
		b := pulse.Timing(tc.off).Drift(tc.ppm)
		if err := b.Process(&f, rng.New(1)); err != nil {
			t.Fatal(err)
		}
		for i := range n {
			tau := sps*tc.off + tc.ppm*1e-6*float64(i)
			if p := float64(i) - tau; p < 1 || p > float64(n-3) {
				continue // the interpolator would read past the frame
			}
			want := cubic(float64(i) - tau)
			if math.Abs(real(f.Samples[i])-want) > 1e-9 || math.Abs(imag(f.Samples[i])+want) > 1e-9 {
				t.Fatalf("offset %v, drift %v: y[%d] = %v, want %v", tc.off, tc.ppm, i, f.Samples[i], want)
			}
		}
	}
}

// A fractional delay of an RRC-shaped signal against the pulse evaluated at the delayed times
// (the continuous-time signal, from RootRaisedCosine.Value): at 4 samples per symbol the cubic
// interpolator's error stays below 1 % of the peak (−40 dB), at 8 below 0.2 %.
func TestTimingFractionalDelay(t *testing.T) {
	for _, tc := range []struct {
		sps int
		tol float64
	}{{4, 0.01}, {8, 0.002}} {
		p := pulse.RRC(0.35).Span(16).SPS(tc.sps)
		g := p.Taps()
		scale := g[len(g)/2] / p.Value(0)
		f := link.Frame{SPS: 1, Symbols: 1, Samples: []complex128{1}}
		if err := p.Shape().Process(&f, nil); err != nil {
			t.Fatal(err)
		}
		d := 0.37 / float64(tc.sps) // 0.37 samples, in symbols
		if err := pulse.Timing(d).Process(&f, nil); err != nil {
			t.Fatal(err)
		}
		c := len(g) / 2
		worst := 0.0
		for i := 2; i < len(g)-2; i++ {
			tau := (float64(i-c) - 0.37) / float64(tc.sps)
			worst = math.Max(worst, math.Abs(real(f.Samples[i])-scale*p.Value(tau))/g[c])
		}
		if worst > tc.tol {
			t.Errorf("SPS %d: worst interpolation error %.4g of the peak, want < %v", tc.sps, worst, tc.tol)
		}
	}
}

func TestPulseErrors(t *testing.T) {
	for _, tc := range []struct {
		err  error
		want string
	}{
		{pulse.RRC(1.5).Err(), "pulse.RRC: roll-off 1.5"},
		{pulse.RRC(0.3).Span(7).Err(), "span 7 symbols"},
		{pulse.RRC(0.3).SPS(1).Err(), "SPS = 1"},
		{pulse.Timing(math.NaN()).Err(), "pulse.Timing: offset NaN"},
		{pulse.Timing(0).Drift(math.Inf(1)).Err(), "drift +Inf ppm"},
	} {
		if tc.err == nil || !strings.Contains(tc.err.Error(), tc.want) {
			t.Errorf("error %v, want one containing %q", tc.err, tc.want)
		}
	}
}
