package impair

import (
	"math"
	"math/cmplx"
	"testing"

	"tally/blocks/channel"
	"tally/blocks/internal/linktest"
	"tally/blocks/rng"
)

// Saleh's AM/AM A(r) = αa·r/(1 + βa·r²) (Saleh, IEEE Trans. Commun., 1981, eq. (1)) peaks where
// dA/dr = 0, at r = 1/√βa, with A = αa/(2√βa); at the published αa = 2.1587, βa = 1.1517 that
// is r = 0.93181, A = 1.00576. The peak is found here by a fine grid search, independent of
// the closed form. The AM/PM there is αφ·r²/(1 + βφ·r²) = 0.39034 rad and tends
// to αφ/βφ = 0.43973 rad at large r (values from the formulas of the paper).
func TestSalehPublishedCurve(t *testing.T) {
	c := SalehPublished
	var rBest, aBest float64
	for i := range 1_000_000 {
		r := 3 * float64(i) / 1e6
		if a := c.AMAM(r); a > aBest {
			rBest, aBest = r, a
		}
	}
	if math.Abs(rBest-0.93181) > 1e-4 {
		t.Errorf("AM/AM peak at input %.5f, want 0.93181", rBest)
	}
	if a := aBest; math.Abs(a-1.00576) > 1e-5 {
		t.Errorf("AM/AM peak output %.5f, want 1.00576", a)
	}
	if r := c.Reference(); math.Abs(r-0.93181) > 1e-5 {
		t.Errorf("reference %.5f, want 0.93181", r)
	}
	if p := c.AMPM(c.Reference()); math.Abs(p-0.39034) > 1e-5 {
		t.Errorf("AM/PM at saturation %.5f rad, want 0.39034", p)
	}
	if p := c.AMPM(1e4); math.Abs(p-0.43973) > 1e-5 {
		t.Errorf("AM/PM at large input %.5f rad, want 0.43973", p)
	}
}

// Rapp's AM/AM A(r) = r/(1 + (r/Sat)^{2p})^{1/(2p)} (Rapp, 1991): gain 1 for small inputs,
// output 2^{−1/(2p)}·Sat at the saturation input (≈ 0.8409 at p = 2), Sat in the limit; and a
// clipper as p grows (values from the formula of the paper).
func TestRappCurve(t *testing.T) {
	for _, p := range []float64{1, 2, 3} {
		c := RappCurve{P: p, Sat: 2}
		if g := c.AMAM(1e-6) / 1e-6; math.Abs(g-1) > 1e-9 {
			t.Errorf("p %v: small-signal gain %v", p, g)
		}
		if a, want := c.AMAM(2), 2*math.Pow(2, -1/(2*p)); math.Abs(a-want) > 1e-12 {
			t.Errorf("p %v: A(Sat) = %v, want %v", p, a, want)
		}
		if a := c.AMAM(1e6); math.Abs(a-2) > 1e-6 {
			t.Errorf("p %v: A(∞) = %v, want 2", p, a)
		}
	}
	if a := (RappCurve{P: 2, Sat: 1}).AMAM(1); math.Abs(a-0.8409) > 1e-4 {
		t.Errorf("p 2: A(1) = %.4f, want 0.8409", a)
	}
	clip := RappCurve{P: 200, Sat: 1}
	if a, b := clip.AMAM(0.5), clip.AMAM(3); math.Abs(a-0.5) > 1e-6 || math.Abs(b-1) > 1e-2 {
		t.Errorf("p 200: A(0.5) = %v, A(3) = %v; want a clipper", a, b)
	}
}

// The cubic's slope falls to zero at Sat and its 1 dB compression point is at
// Sat·√(3(1 − 10^{−1/20})) (both derived from the polynomial r − r³/(3 Sat²)).
func TestCubicCurve(t *testing.T) {
	c := CubicCurve{Sat: 1.5}
	h := 1e-6
	if d := (c.AMAM(c.Sat) - c.AMAM(c.Sat-h)) / h; math.Abs(d) > 1e-5 {
		t.Errorf("slope at Sat %v, want 0", d)
	}
	r := c.Sat * math.Sqrt(3*(1-math.Pow(10, -1.0/20)))
	if g := 20 * math.Log10(c.AMAM(r)/r); math.Abs(g+1) > 1e-9 {
		t.Errorf("gain at the 1 dB point %v dB", g)
	}
	if c.AMAM(2*c.Sat) != c.AMAM(c.Sat) {
		t.Errorf("cubic not held at its peak beyond Sat")
	}
}

// The block drives the curve at the stated back-off: with FixedGain, a unit-amplitude input at
// SPS 1 (nominal RMS 1) meets the curve at Reference·10^{−IBO/20} and leaves with amplitude
// A(u)/(u·Gain) and phase Φ(u).
func TestAmplifierDrive(t *testing.T) {
	const ibo = 3.0
	for _, a := range []*Amplifier{Rapp(ibo, 2).FixedGain(), Saleh(ibo).FixedGain(), Cubic(ibo).FixedGain()} {
		c := a.Curve
		u := c.Reference() * math.Pow(10, -ibo/20)
		f := ones(3, 1)
		if err := a.Process(f, rng.New(1)); err != nil {
			t.Fatal(err)
		}
		want := cmplx.Rect(c.AMAM(u)/(u*c.Gain()), c.AMPM(u))
		if cmplx.Abs(f.Samples[1]-want) > 1e-12 {
			t.Errorf("%s: output %v, want %v", a.Name(), f.Samples[1], want)
		}
	}
}

// On a constant-envelope signal a memoryless AM/AM is a plain gain (common practice, no
// source): rescaled, QPSK through a Rapp amplifier at saturation keeps its AWGN BER; with
// fixed gain it loses 20·log10(A(1)/1) = 10·log10(2^{1/p}) dB of Eb/N0 (Rapp's formula at
// IBO = 0, Sat = 1), 1.505 dB at p = 2.
func TestAmplifierConstantEnvelope(t *testing.T) {
	const db = 5.0
	m := linktest.NewModem(1, 1)
	src := &linktest.Source{N: 4000}
	e, n := linktest.BER(t, 21, 40, src, m, Rapp(0, 2), channel.AWGN(db), m.Demod())
	linktest.Within(t, "QPSK, Rapp at 0 dB IBO, rescaled", e, n, linktest.BERQPSK(db))
	e, n = linktest.BER(t, 22, 40, src, m, Rapp(0, 2).FixedGain(), channel.AWGN(db), m.Demod())
	linktest.Within(t, "QPSK, Rapp at 0 dB IBO, fixed gain", e, n, linktest.BERQPSK(db-10*math.Log10(math.Sqrt2)))
}

// 16-QAM near saturation is distorted: a clear penalty over theory (the block does act).
func TestAmplifierQAMPenalty(t *testing.T) {
	const db = 12.0
	m := linktest.NewModem(2, 2)
	src := &linktest.Source{N: 4000}
	e, n := linktest.BER(t, 23, 20, src, m, Saleh(3), channel.AWGN(db), m.Demod())
	if r := float64(e) / float64(n); r < 10*linktest.BER16QAM(db) {
		t.Errorf("16-QAM through Saleh at 3 dB IBO: BER %.3g, theory %.3g; expected a clear penalty", r, linktest.BER16QAM(db))
	}
}
