package theory

import (
	"math"

	"gonum.org/v1/gonum/integrate/quad"
)

// The limits no code can beat on the binary-input AWGN channel (BPSK, soft output).
//
// A BPSK symbol ±√Es in real Gaussian noise of variance N0/2 gives the channel LLR
// L = 4·y·√Es/N0, which, given the symbol +√Es was sent, is Gaussian with mean μ = 4·Es/N0 and
// variance 2μ. The information density of the equiprobable input is i = 1 − log2(1 + e^(−L)),
// so (Richardson and Urbanke, Modern Coding Theory, 2008, §4.2; Polyanskiy, Poor and Verdú,
// Channel coding rate in the finite blocklength regime, IEEE Trans. Inf. Theory, 2010, §IV)
//
//	C = E[i] = 1 − E[log2(1 + e^(−L))]           bits per channel use,
//	V = Var[i] = E[log2²(1 + e^(−L))] − (1 − C)²  the channel dispersion, bits².
//
// Both expectations are integrals against a Gaussian density, computed by Gauss–Legendre
// quadrature (gonum's integrate/quad) in z = (L − μ)/√(2μ) over ±16 (the Gaussian tail beyond
// holds less than 1e-57). Gauss–Hermite converges slowly here: log(1 + e^(−L)) has poles at
// L = ±iπ, close to the real axis when μ is large.

// quadNodes is the order of the Gauss–Legendre rule; 1500 nodes agree with an independent
// integration to about 1e-15 (see the tests).
const quadNodes = 1500

// softplusNeg is ln(1 + e^(−l)) without overflow.
func softplusNeg(l float64) float64 {
	if l > 0 {
		return math.Log1p(math.Exp(-l))
	}
	return -l + math.Log1p(math.Exp(l))
}

// biawgnMoments returns E[log2(1+e^(−L))] and E[log2²(1+e^(−L))] at Es/N0 = g (linear).
func biawgnMoments(g float64) (m1, m2 float64) {
	mu := 4 * g
	s := math.Sqrt(2 * mu)
	norm := 1 / (math.Sqrt(2*math.Pi) * math.Ln2)
	f := func(z float64) float64 { return math.Exp(-z*z/2) * softplusNeg(mu+s*z) }
	m1 = norm * quad.Fixed(f, -16, 16, quadNodes, quad.Legendre{}, 0)
	m2 = norm / math.Ln2 * quad.Fixed(func(z float64) float64 {
		return f(z) * softplusNeg(mu+s*z)
	}, -16, 16, quadNodes, quad.Legendre{}, 0)
	return m1, m2
}

// BIAWGNCapacity is the capacity of the binary-input AWGN channel in bits per channel use at
// the symbol energy Es/N0 given in dB (see above). It rises from 0 to 1; NaN for NaN input.
func BIAWGNCapacity(esn0DB float64) float64 {
	g := FromDB(esn0DB)
	switch {
	case math.IsNaN(g):
		return math.NaN()
	case g == 0:
		return 0
	case math.IsInf(g, 1) || g > 1e4:
		return 1
	}
	m1, _ := biawgnMoments(g)
	return 1 - m1
}

// BIAWGNDispersion is the channel dispersion V of the binary-input AWGN channel in bits² at
// Es/N0 in dB (see above). NaN for NaN input.
func BIAWGNDispersion(esn0DB float64) float64 {
	g := FromDB(esn0DB)
	switch {
	case math.IsNaN(g):
		return math.NaN()
	case g == 0 || math.IsInf(g, 1) || g > 1e4:
		return 0
	}
	m1, m2 := biawgnMoments(g)
	return max(m2-m1*m1, 0)
}

// ShannonLimit is the least Eb/N0 in dB at which a code of the given rate can be decoded with
// vanishing error probability on the binary-input AWGN channel: the Eb/N0 where
// BIAWGNCapacity(Eb/N0 · rate) = rate. About 0.19 dB for rate 1/2, falling to −1.59 dB as the
// rate falls to 0. NaN for a rate outside (0, 1).
func ShannonLimit(rate float64) float64 {
	if !(rate > 0 && rate < 1) {
		return math.NaN()
	}
	es := ToDB(rate)
	lo, hi := -30.0, 40.0
	for hi-lo > 1e-9 {
		mid := 0.5 * (lo + hi)
		if BIAWGNCapacity(mid+es) < rate {
			lo = mid
		} else {
			hi = mid
		}
	}
	return 0.5 * (lo + hi)
}

// NormalApprox is the frame error rate that the best code with k information bits in n BPSK
// symbols can reach on the AWGN channel at Eb/N0 in dB (per information bit, so
// Es/N0 = Eb/N0 · k/n), by the normal approximation of Polyanskiy, Poor and Verdú (2010)
//
//	log2 M ≈ n·C − √(n·V)·Q⁻¹(ε) + ½·log2 n,   M = 2^k,
//
// solved for ε:  ε ≈ Q((n·C − k + ½·log2 n) / √(n·V)), with C and V of the binary-input AWGN
// channel (BIAWGNCapacity, BIAWGNDispersion). It is an approximation of the finite-length
// limit, accurate to a few tenths of a dB for n above a hundred or so; a simulated FER clearly
// below it points to a mistake in the link (energy per bit, a rate not counted) rather than to a
// good code. NaN for n < 1 or k outside 1…n.
func NormalApprox(n, k int, ebn0DB float64) float64 {
	if n < 1 || k < 1 || k > n || math.IsNaN(ebn0DB) {
		return math.NaN()
	}
	es := ebn0DB + ToDB(float64(k)/float64(n))
	c, v := BIAWGNCapacity(es), BIAWGNDispersion(es)
	num := float64(n)*c - float64(k) + 0.5*math.Log2(float64(n))
	if v == 0 {
		if num > 0 {
			return 0
		}
		return 1
	}
	return Q(num / math.Sqrt(float64(n)*v))
}
