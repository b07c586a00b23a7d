package theory

import (
	"math"

	"gonum.org/v1/gonum/integrate/quad"
)

// DBPSK is the bit error rate of binary differential PSK with differential detection (the
// product of each sample with the conjugate of the one before), Pb = ½·exp(−γb)
// (Proakis, Digital Communications, 4th ed., 2001, ch. 5).
func DBPSK(ebn0DB float64) float64 { return 0.5 * math.Exp(-FromDB(ebn0DB)) }

// DQPSK is the bit error rate of Gray-labelled differential QPSK with differential detection,
//
//	Pb = Q1(a, b) − ½·I0(ab)·exp(−(a² + b²)/2),   a = √(2γb(1 − 1/√2)),  b = √(2γb(1 + 1/√2)),
//
// with Q1 Marcum's Q function (Proakis, Digital Communications, 4th ed., 2001, ch. 5). It is
// evaluated in the single-integral form that follows from Craig-type representations of Q1
// and I0 (Simon and Alouini, Digital Communication over Fading Channels, 2000, ch. 8),
//
//	Pb = 1/(4π) ∫_{−π}^{π} (1 − ζ²)/(1 + 2ζ sin θ + ζ²) · exp(−b²/2·(1 + 2ζ sin θ + ζ²)) dθ,  ζ = a/b,
//
// by Gauss–Legendre quadrature.
func DQPSK(ebn0DB float64) float64 {
	g := FromDB(ebn0DB)
	if math.IsNaN(g) {
		return math.NaN()
	}
	a := math.Sqrt(2 * g * (1 - 1/math.Sqrt2))
	b := math.Sqrt(2 * g * (1 + 1/math.Sqrt2))
	return differentialBER(a, b)
}

// differentialBER is Q1(a,b) − ½I0(ab)exp(−(a²+b²)/2) for 0 ≤ a < b, by the integral above.
func differentialBER(a, b float64) float64 {
	z := a / b
	h := b * b / 2
	f := func(t float64) float64 {
		d := 1 + 2*z*math.Sin(t) + z*z
		return (1 - z*z) / d * math.Exp(-h*d)
	}
	// The integrand peaks at θ = −π/2 where d is smallest: split there so each panel is smooth
	// and well resolved.
	return (panels(f, -math.Pi, -math.Pi/2, 4) + panels(f, -math.Pi/2, math.Pi, 8)) / (4 * math.Pi)
}

// panels integrates f over [a, b] by n equal panels of 32-point Gauss–Legendre quadrature.
func panels(f func(float64) float64, a, b float64, n int) float64 {
	if !(b > a) {
		return 0
	}
	w := (b - a) / float64(n)
	s := 0.0
	for i := range n {
		s += quad.Fixed(f, a+float64(i)*w, a+float64(i+1)*w, 32, quad.Legendre{}, 0)
	}
	return s
}
