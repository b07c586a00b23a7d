package theory

import (
	"math"

	"gonum.org/v1/gonum/integrate/quad"
)

// Error rates in flat fading with perfect channel knowledge at the receiver (coherent
// detection after the channel gain is removed). The Eb/N0 is the average one, γ̄b = E|h|²·Eb/N0
// with E|h|² = 1 as in channel.Rayleigh and channel.Rician, and the gain is constant over a
// symbol and independent of the noise. Every average is over the fading law only, so the same
// curve holds for per-symbol, block and time-correlated fading.
//
// Method: write the AWGN error probability in Craig's form, Q(√(2gγ)) = 1/π ∫_0^{π/2}
// exp(−gγ/sin²θ) dθ; averaging over the instantaneous SNR γ then gives integrals of the
// moment-generating function Mγ(s) = E[exp(sγ)] at s = −g/sin²θ (Simon and Alouini, Digital
// Communication over Fading Channels, 2nd ed., 2005, ch. 8), computed by Gauss–Legendre
// quadrature (gonum integrate/quad). The MGFs (ibid., Table 2.2) are
//
//	Rayleigh:  Mγ(s) = 1/(1 − sγ̄)
//	Rician K:  Mγ(s) = (1+K)/(1+K−sγ̄) · exp(K·sγ̄/(1+K−sγ̄))
//
// with K the line-of-sight over scattered power, linear (K = 0 is Rayleigh, K → ∞ no fading).

// BPSKRayleigh is the bit error rate of coherent BPSK in flat Rayleigh fading,
// Pb = ½·(1 − √(γ̄b/(1+γ̄b))) (Proakis, Digital Communications, 4th ed., 2001, eq. 14.3-7).
// Gray QPSK has the same bit error rate (QPSKRayleigh).
func BPSKRayleigh(ebn0DB float64) float64 {
	g := FromDB(ebn0DB)
	return 0.5 * (1 - math.Sqrt(g/(1+g)))
}

// QPSKRayleigh is the bit error rate of coherent Gray QPSK in flat Rayleigh fading, the same as
// BPSK's: each bit is a BPSK decision on one axis with the same fading.
func QPSKRayleigh(ebn0DB float64) float64 { return BPSKRayleigh(ebn0DB) }

// BPSKRician is the bit error rate of coherent BPSK in flat Rician fading with factor k
// (linear): Pb = 1/π ∫_0^{π/2} Mγ(−1/sin²θ) dθ with the Rician MGF (see above).
func BPSKRician(k, ebn0DB float64) float64 {
	g := FromDB(ebn0DB)
	if !(k >= 0) || math.IsNaN(g) {
		return math.NaN()
	}
	return fadingCraig(ricianMGF(k, g), 1, math.Pi/2) / math.Pi
}

// QPSKRician is the bit error rate of coherent Gray QPSK in flat Rician fading, the same as
// BPSKRician.
func QPSKRician(k, ebn0DB float64) float64 { return BPSKRician(k, ebn0DB) }

// PSKSERRayleigh is the symbol error rate of coherent M-PSK in flat Rayleigh fading.
func PSKSERRayleigh(M int, ebn0DB float64) float64 { return PSKSERRician(M, 0, ebn0DB) }

// PSKSERRician is the symbol error rate of coherent M-PSK in flat Rician fading with factor k
// (linear), Ps = 1/π ∫_0^{(M−1)π/M} Mγs(−sin²(π/M)/sin²θ) dθ, γ̄s = γ̄b·log2(M) (Simon and
// Alouini, 2005, ch. 8, from Craig's form of the AWGN symbol error rate).
func PSKSERRician(M int, k, ebn0DB float64) float64 {
	b := log2M(M)
	gs := FromDB(ebn0DB) * float64(b)
	if b == 0 || !(k >= 0) || math.IsNaN(gs) {
		return math.NaN()
	}
	s := math.Sin(math.Pi / float64(M))
	return fadingCraig(ricianMGF(k, gs), s*s, float64(M-1)*math.Pi/float64(M)) / math.Pi
}

// QAMSERRayleigh is the symbol error rate of square M-QAM in flat Rayleigh fading.
func QAMSERRayleigh(M int, ebn0DB float64) float64 { return QAMSERRician(M, 0, ebn0DB) }

// QAMSERRician is the symbol error rate of square M-QAM (M = 4, 16, 64, …) in flat Rician
// fading with factor k (linear): with q = 1 − 1/√M and g = 3/(2(M−1)),
//
//	Ps = 4q/π ∫_0^{π/2} Mγs(−g/sin²θ) dθ − 4q²/π ∫_0^{π/4} Mγs(−g/sin²θ) dθ
//
// (Simon and Alouini, 2005, ch. 8, from Craig's forms of Q(x) and Q(x)²).
func QAMSERRician(M int, k, ebn0DB float64) float64 {
	b := log2M(M)
	gs := FromDB(ebn0DB) * float64(b)
	if b == 0 || b%2 != 0 || !(k >= 0) || math.IsNaN(gs) {
		return math.NaN()
	}
	q := 1 - 1/math.Sqrt(float64(M))
	g := 3 / (2 * float64(M-1))
	mgf := ricianMGF(k, gs)
	return 4*q/math.Pi*fadingCraig(mgf, g, math.Pi/2) - 4*q*q/math.Pi*fadingCraig(mgf, g, math.Pi/4)
}

// ricianMGF returns s ↦ Mγ(s) of the instantaneous SNR in Rician fading with average SNR mean.
func ricianMGF(k, mean float64) func(s float64) float64 {
	return func(s float64) float64 {
		d := 1 + k - s*mean
		return (1 + k) / d * math.Exp(k*s*mean/d)
	}
}

// fadingCraig is ∫_0^top M(−g/sin²θ) dθ, by 32-point Gauss–Legendre on 8 equal panels (the
// integrand is smooth, rising from 0 at θ = 0 to its largest value at θ = π/2).
func fadingCraig(mgf func(float64) float64, g, top float64) float64 {
	f := func(t float64) float64 {
		s := math.Sin(t)
		if s == 0 {
			return 0
		}
		return mgf(-g / (s * s))
	}
	const n = 8
	w := top / n
	v := 0.0
	for i := range n {
		v += quad.Fixed(f, float64(i)*w, float64(i+1)*w, 32, quad.Legendre{}, 0)
	}
	return v
}
