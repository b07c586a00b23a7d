package modem

import "math"

// logI0 is log I0(x) for x ≥ 0, I0 the modified Bessel function of the first kind, which the
// noncoherent detectors' exact LLRs need (gonum and the standard library have no I0).
//
// For x < 20 the power series I0(x) = Σ_k ((x/2)^{2k} / (k!)²) (Abramowitz and Stegun,
// Handbook of Mathematical Functions, 1964, eq. 9.6.12); above it the asymptotic expansion
// I0(x) ≈ e^x/√(2πx)·(1 + 1/(8x) + 9/(2(8x)²) + 225/(6(8x)³) + 11025/(24(8x)⁴)) (eq. 9.7.1),
// whose first omitted term is below 1e−7 there.
func logI0(x float64) float64 {
	if x < 20 {
		t := x * x / 4
		term, sum := 1.0, 1.0
		for k := 1; k < 200; k++ {
			term *= t / float64(k*k)
			sum += term
			if term < sum*1e-17 {
				break
			}
		}
		return math.Log(sum)
	}
	y := 1 / (8 * x)
	s := 1 + y*(1+y*(9.0/2+y*(225.0/6+y*11025.0/24)))
	return x - 0.5*math.Log(2*math.Pi*x) + math.Log(s)
}
