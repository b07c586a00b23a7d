package noise

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
	"gonum.org/v1/gonum/stat/distuv"

	"tally/blocks/channel"
	"tally/blocks/internal/linktest"
	"tally/blocks/link"
	"tally/blocks/rng"
)

var classACases = []struct{ a, gamma float64 }{{0.1, 0.01}, {0.35, 0.5}, {1, 0.1}, {5, 1}}

// integral is ∫ g(x)·ClassAPDF(x) dx over the line, by gonum's quadrature on pieces of a few
// standard deviations of the widest state (the density mixes very different widths).
func integral(g func(float64) float64, a, gamma, v float64) float64 {
	wide := math.Sqrt(v * (30/a + gamma) / (1 + gamma))
	h := func(x float64) float64 { return g(x) * ClassAPDF(x, a, gamma, v) }
	var s float64
	edges := []float64{0, 1e-3 * wide, 1e-2 * wide, 0.1 * wide, 0.5 * wide, wide, 3 * wide, 10 * wide}
	for i := 1; i < len(edges); i++ {
		s += 2 * quad.Fixed(h, edges[i-1], edges[i], 200, nil, 0) // the density is even
	}
	return s + 2*quad.Fixed(h, 10*wide, math.Inf(1), 200, nil, 0)
}

// The Class A density (Middleton, 1977) is a density — it integrates to one — and has the
// variance it is given (its second moment Σ P_m σ_m² = v·(A/A + Γ)/(1 + Γ) = v), checked by
// gonum quadrature.
func TestClassAPDF(t *testing.T) {
	const v = 0.7
	for _, c := range classACases {
		if s := integral(func(float64) float64 { return 1 }, c.a, c.gamma, v); math.Abs(s-1) > 1e-9 {
			t.Errorf("A %v Γ %v: ∫p = %.12f", c.a, c.gamma, s)
		}
		if s := integral(func(x float64) float64 { return x * x }, c.a, c.gamma, v); math.Abs(s-v) > 1e-9 {
			t.Errorf("A %v Γ %v: ∫x²p = %.12f, want %v", c.a, c.gamma, s, v)
		}
	}
	// Γ → ∞ is Gaussian (gonum distuv).
	if p, q := ClassAPDF(0.3, 0.5, math.Inf(1), 2), (distuv.Normal{Sigma: math.Sqrt(2)}).Prob(0.3); math.Abs(p-q) > 1e-15 {
		t.Errorf("Γ = ∞: %v, Gaussian %v", p, q)
	}
}

// zeroFrame is a frame of n zero symbols after a unit-energy 1 bit/symbol modulator.
func zeroFrame(n int) *link.Frame {
	return &link.Frame{SPS: 1, Es: 1, BitsPerSymbol: 1, CodeRate: 1, Samples: make([]complex128, n)}
}

// sampleMoments adds the channel's noise to zero frames and returns the per-dimension
// variance, its fourth moment and the count of values.
func sampleMoments(t *testing.T, b link.Block, frames, n int) (v, m4 float64, k int) {
	for i := range frames {
		f := zeroFrame(n)
		if err := b.Process(f, rng.New(rng.Key(7, 0, i, 0))); err != nil {
			t.Fatal(err)
		}
		for _, y := range f.Samples {
			for _, x := range []float64{real(y), imag(y)} {
				v += x * x
				m4 += x * x * x * x
				k++
			}
		}
	}
	return v / float64(k), m4 / float64(k), k
}

// Sampled noise has variance N0/2 per dimension, N0 from Eb/N0 as channel.AWGN sets it. The
// check is a normal approximation to the sample variance (standard error √((μ4 − σ⁴)/n)) at
// 3.3 standard errors (two-sided 99.9 %), with the sample's own fourth moment.
func TestSampledVariance(t *testing.T) {
	const db = 3.0
	n0 := 1 / math.Pow(10, db/10)
	var blocks []link.Block
	for _, c := range classACases {
		blocks = append(blocks, ClassA(db, c.a, c.gamma))
	}
	blocks = append(blocks, BernoulliGaussian(db, 0.01, 100), BernoulliGaussian(db, 0.2, 10), Laplacian(db))
	for _, b := range blocks {
		v, m4, k := sampleMoments(t, b, 20, 10000)
		se := math.Sqrt((m4 - v*v) / float64(k))
		if math.Abs(v-n0/2) > 3.3*se {
			t.Errorf("%s: variance per dimension %.5f, want %.5f (standard error %.5f)", link.NameOf(b), v, n0/2, se)
		}
		f := zeroFrame(4)
		_ = b.Process(f, rng.New(1))
		if f.N0 != n0 {
			t.Errorf("%s: f.N0 = %v, want %v", link.NameOf(b), f.N0, n0)
		}
	}
}

// BPSK with a sign detector in these noises: conditioned on the state, the noise is Gaussian,
// so Pb is a mixture of Gaussian tails (the Class A and Bernoulli–Gaussian models as defined
// by Middleton 1977 and Ghosh 1996); for Laplacian noise Pb is the Laplace tail at −√Eb
// (gonum distuv.Laplace.CDF). The MC BER must hold each within its 99 % interval.
func TestBPSKTheory(t *testing.T) {
	const db = 6.0
	n0 := 1 / math.Pow(10, db/10)
	s := math.Sqrt(n0 / 2) // per-dimension standard deviation, Eb = Es = 1
	classA := func(a, gamma float64) float64 {
		pois := distuv.Poisson{Lambda: a}
		var p float64
		for m := 0; m < 200; m++ {
			sm := s * math.Sqrt((float64(m)/a+gamma)/(1+gamma))
			p += pois.Prob(float64(m)) * linktest.Q(1/sm)
		}
		return p
	}
	bg := func(p, r float64) float64 {
		sg := s / math.Sqrt(1+p*r)
		return (1-p)*linktest.Q(1/sg) + p*linktest.Q(1/(sg*math.Sqrt(1+r)))
	}
	cases := []struct {
		b    link.Block
		want float64
	}{
		{ClassA(db, 0.1, 0.01), classA(0.1, 0.01)},
		{ClassA(db, 1, 0.1), classA(1, 0.1)},
		{BernoulliGaussian(db, 0.01, 100), bg(0.01, 100)},
		{BernoulliGaussian(db, 0.1, 30), bg(0.1, 30)},
		{Laplacian(db), distuv.Laplace{Scale: math.Sqrt(n0) / 2}.CDF(-1)},
	}
	src := &linktest.Source{N: 4096}
	m := linktest.NewModem(1, 0)
	for k, c := range cases {
		e, n := linktest.BER(t, uint64(50+k), 30, src, m, c.b, m.Demod())
		linktest.Within(t, link.NameOf(c.b), e, n, c.want)
	}
}

// Switched off (Γ = ∞, P = 0), each channel is AWGN: BER at Q(√(2Eb/N0)) within 99 %, for a
// real (BPSK) and a complex (QPSK) signal.
func TestZeroIsAWGN(t *testing.T) {
	const db = 4.0
	src := &linktest.Source{N: 4096}
	for _, bps := range []int{1, 2} {
		m := linktest.NewModem(1, bps-1)
		for k, b := range []link.Block{ClassA(db, 0.1, math.Inf(1)), BernoulliGaussian(db, 0, 100), BernoulliGaussian(db, 0.1, 0)} {
			e, n := linktest.BER(t, uint64(80+k), 25, src, m, b, m.Demod())
			linktest.Within(t, fmt.Sprintf("%s, %d bit/symbol", link.NameOf(b), bps), e, n, linktest.BERQPSK(db))
		}
	}
}

// The level follows channel.WhiteNoise: By(channel.EsN0) reads the number as Es/N0.
func TestLevel(t *testing.T) {
	f := zeroFrame(8)
	f.BitsPerSymbol = 2
	c := Laplacian(3).By(channel.EsN0)
	if err := c.Process(f, rng.New(1)); err != nil {
		t.Fatal(err)
	}
	if want := 1 / math.Pow(10, 0.3); math.Abs(f.N0-want) > 1e-15 {
		t.Errorf("Es/N0 3 dB: N0 %v, want %v", f.N0, want)
	}
	f = zeroFrame(8)
	f.BitsPerSymbol = 0
	if err := ClassA(3, 1, 1).Process(f, rng.New(1)); err == nil {
		t.Errorf("Eb/N0 without a modulator: no error")
	}
}

// Bad parameters are reported with the block, the parameter and the value.
func TestErrors(t *testing.T) {
	for _, c := range []struct {
		b    link.Checked
		want string
	}{
		{ClassA(math.NaN(), 1, 1), "noise.ClassA: level NaN"},
		{ClassA(3, 0, 1), "noise.ClassA: impulsive index A = 0"},
		{ClassA(3, 1, -1), "noise.ClassA: Γ = -1"},
		{BernoulliGaussian(3, 1.5, 1), "noise.BernoulliGaussian: impulse probability 1.5"},
		{BernoulliGaussian(3, 0.1, math.NaN()), "noise.BernoulliGaussian: impulse-to-background ratio NaN"},
		{Laplacian(math.Inf(-1)), "noise.Laplacian: level -Inf"},
	} {
		err := c.b.Err()
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("got %v, want a message containing %q", err, c.want)
		}
	}
}
