package impair

import (
	"fmt"
	"math"

	"tally/blocks/link"
	"tally/blocks/rng"
)

// Curve is a memoryless (frequency-independent) amplifier characteristic: an input of
// amplitude r leaves with amplitude AMAM(r) and an extra phase AMPM(r) radians. Reference is
// the input amplitude the back-off is measured from and Gain the small-signal gain
// dAMAM/dr at r = 0.
type Curve interface {
	AMAM(r float64) float64
	AMPM(r float64) float64
	Reference() float64
	Gain() float64
}

// RappCurve is the solid-state amplifier model of Rapp, "Effects of HPA-nonlinearity on a
// 4-DPSK/OFDM-signal for a digital sound broadcasting system", Proc. 2nd European Conference
// on Satellite Communications, 1991:
//
//	A(r) = r / (1 + (r/Sat)^{2p})^{1/(2p)},   Φ(r) = 0,
//
// unit small-signal gain, output saturating at Sat; larger p is a sharper knee (p → ∞ is an
// ideal clipper). The back-off reference is the input amplitude Sat. Sat only scales the curve
// (A_Sat(r) = Sat·A_1(r/Sat)), so in an Amplifier, whose drive is set relative to it, its value
// does not change the result; it gives the curve absolute units for plots.
type RappCurve struct {
	P   float64 // smoothness p (> 0); 2 to 3 is typical of solid-state amplifiers
	Sat float64 // saturation amplitude (input reference and output limit)
}

// AMAM is A(r).
func (c RappCurve) AMAM(r float64) float64 {
	return r / math.Pow(1+math.Pow(r/c.Sat, 2*c.P), 1/(2*c.P))
}

// AMPM is zero: the model has no AM/PM.
func (c RappCurve) AMPM(r float64) float64 { return 0 }

// Reference is Sat.
func (c RappCurve) Reference() float64 { return c.Sat }

// Gain is 1.
func (c RappCurve) Gain() float64 { return 1 }

// SalehCurve is the travelling-wave-tube model of Saleh, "Frequency-independent and
// frequency-dependent nonlinear models of TWT amplifiers", IEEE Trans. Commun., 1981, eq. (1):
//
//	A(r) = αa·r / (1 + βa·r²),   Φ(r) = αφ·r² / (1 + βφ·r²)  (radians).
//
// A peaks at r = 1/√βa with value αa/(2√βa) (saturation); the back-off reference is that
// input amplitude. Saleh (1981) fits αa = 2.1587, βa = 1.1517, αφ = 4.0033, βφ = 9.1040,
// SalehPublished.
type SalehCurve struct {
	AlphaA, BetaA     float64 // AM/AM parameters
	AlphaPhi, BetaPhi float64 // AM/PM parameters (radians)
}

// SalehPublished is the parameter set of Saleh (1981) quoted above.
var SalehPublished = SalehCurve{AlphaA: 2.1587, BetaA: 1.1517, AlphaPhi: 4.0033, BetaPhi: 9.1040}

// AMAM is A(r).
func (c SalehCurve) AMAM(r float64) float64 { return c.AlphaA * r / (1 + c.BetaA*r*r) }

// AMPM is Φ(r) in radians.
func (c SalehCurve) AMPM(r float64) float64 { return c.AlphaPhi * r * r / (1 + c.BetaPhi*r*r) }

// Reference is the input amplitude at saturation, 1/√βa.
func (c SalehCurve) Reference() float64 { return 1 / math.Sqrt(c.BetaA) }

// Gain is αa.
func (c SalehCurve) Gain() float64 { return c.AlphaA }

// CubicCurve is the third-order polynomial amplifier, held at its peak beyond it:
//
//	A(r) = r − r³/(3·Sat²)  for r ≤ Sat,   A(r) = (2/3)·Sat  for r > Sat,   Φ(r) = 0,
//
// unit small-signal gain; dA/dr falls to zero at r = Sat, the back-off reference. Its 1 dB
// compression point is at r = Sat·√(3(1 − 10^{−1/20})) ≈ 0.572·Sat.
type CubicCurve struct {
	Sat float64 // input amplitude of the peak
}

// AMAM is A(r).
func (c CubicCurve) AMAM(r float64) float64 {
	if r >= c.Sat {
		return 2 * c.Sat / 3
	}
	return r - r*r*r/(3*c.Sat*c.Sat)
}

// AMPM is zero.
func (c CubicCurve) AMPM(r float64) float64 { return 0 }

// Reference is Sat.
func (c CubicCurve) Reference() float64 { return c.Sat }

// Gain is 1.
func (c CubicCurve) Gain() float64 { return 1 }

// Amplifier drives a power amplifier Curve at an input back-off: the signal is scaled so its
// nominal mean power Es/SPS sits BackOff dB below the square of the curve's reference input
// amplitude,
//
//	IBO = 10·log10(Reference² / P_in),
//
// passed through the curve, y = A(|u|)·e^{j(arg u + Φ(|u|))}, and brought back to the
// input's scale:
//   - by default the output is rescaled to the input's mean power measured over the frame (an
//     ideal receiver gain control): Eb/N0 is then referred to the amplifier's output and the
//     BER shows the distortion penalty only (add the output back-off for the total
//     degradation);
//   - with FixedGain it is divided by the drive and the small-signal gain, so small signals
//     pass unchanged and the power lost to compression shows as an extra penalty.
//
// BackOff = +Inf is a linear amplifier (the identity).
type Amplifier struct {
	Curve   Curve
	BackOff float64 // input back-off, dB
	Fixed   bool    // FixedGain: no output power normalisation
	Label   string  // name in messages
}

// PA is an amplifier of characteristic c driven at iboDB of input back-off.
func PA(iboDB float64, c Curve) *Amplifier {
	return &Amplifier{Curve: c, BackOff: iboDB, Label: "impair.PA"}
}

// Rapp is a solid-state amplifier (RappCurve, Sat = 1) of smoothness p at iboDB back-off
// from its saturation input.
func Rapp(iboDB, p float64) *Amplifier {
	return &Amplifier{Curve: RappCurve{P: p, Sat: 1}, BackOff: iboDB, Label: "impair.Rapp"}
}

// Saleh is a travelling-wave tube with Saleh's published parameters (SalehPublished) at
// iboDB back-off from its saturation input.
func Saleh(iboDB float64) *Amplifier {
	return &Amplifier{Curve: SalehPublished, BackOff: iboDB, Label: "impair.Saleh"}
}

// Cubic is the third-order amplifier (CubicCurve, Sat = 1) at iboDB back-off from its peak.
func Cubic(iboDB float64) *Amplifier {
	return &Amplifier{Curve: CubicCurve{Sat: 1}, BackOff: iboDB, Label: "impair.Cubic"}
}

// FixedGain keeps the small-signal gain at one instead of normalising the output power.
func (a *Amplifier) FixedGain() *Amplifier { a.Fixed = true; return a }

// Name is the constructor's name.
func (a *Amplifier) Name() string { return a.Label }

// Err reports a missing curve, bad curve parameters or a back-off that is NaN or −Inf.
func (a *Amplifier) Err() error {
	if a.Curve == nil {
		return fmt.Errorf("%s: no amplifier curve", a.Label)
	}
	if math.IsNaN(a.BackOff) || math.IsInf(a.BackOff, -1) {
		return fmt.Errorf("%s: back-off %v dB is not a number (use +Inf for a linear amplifier)", a.Label, a.BackOff)
	}
	switch c := a.Curve.(type) {
	case RappCurve:
		if !finite(c.P) || c.P <= 0 {
			return fmt.Errorf("%s: smoothness p = %v must be positive", a.Label, c.P)
		}
		if !finite(c.Sat) || c.Sat <= 0 {
			return fmt.Errorf("%s: saturation %v must be positive", a.Label, c.Sat)
		}
	case SalehCurve:
		for _, v := range []float64{c.AlphaA, c.BetaA, c.AlphaPhi, c.BetaPhi} {
			if !finite(v) {
				return fmt.Errorf("%s: parameter %v is not a finite number", a.Label, v)
			}
		}
		if c.AlphaA <= 0 || c.BetaA <= 0 || c.BetaPhi < 0 {
			return fmt.Errorf("%s: need αa > 0, βa > 0, βφ ≥ 0 (got %v, %v, %v)", a.Label, c.AlphaA, c.BetaA, c.BetaPhi)
		}
	case CubicCurve:
		if !finite(c.Sat) || c.Sat <= 0 {
			return fmt.Errorf("%s: saturation %v must be positive", a.Label, c.Sat)
		}
	}
	if g, ref := a.Curve.Gain(), a.Curve.Reference(); !(g > 0) || !(ref > 0) || !finite(g) || !finite(ref) {
		return fmt.Errorf("%s: curve gain %v and reference %v must be positive", a.Label, g, ref)
	}
	return nil
}

// Process amplifies the frame; infinite back-off leaves it untouched.
func (a *Amplifier) Process(f *link.Frame, r *rng.Stream) error {
	if math.IsInf(a.BackOff, 1) || len(f.Samples) == 0 {
		return nil
	}
	f.MakeComplex(r)
	c := a.Curve
	drive := c.Reference() * math.Pow(10, -a.BackOff/20) / rmsAmplitude(f)
	g0 := c.Gain()
	var pin, pout float64
	for n, x := range f.Samples {
		re, im := real(x), imag(x)
		m2 := re*re + im*im
		if m2 == 0 {
			continue
		}
		m := math.Sqrt(m2)
		u := drive * m
		k := c.AMAM(u) / (u * g0) // y = x·k: amplitude A(u)/(drive·g0), back at the input scale
		y := x * complex(k, 0)
		if p := c.AMPM(u); p != 0 {
			s, co := math.Sincos(p)
			y *= complex(co, s)
		}
		f.Samples[n] = y
		pin += m2
		pout += k * k * m2
	}
	if !a.Fixed && pout > 0 {
		g := complex(math.Sqrt(pin/pout), 0)
		for n := range f.Samples {
			f.Samples[n] *= g
		}
	}
	return nil
}
