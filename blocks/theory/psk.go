package theory

import (
	"math"
	"math/bits"
)

// PSKSER is the exact symbol error rate of coherent M-PSK (M = 2, 4, …, a power of two), from
// Craig's form (Craig, "A new, simple and exact result for calculating the probability of error
// for two-dimensional signal constellations", IEEE MILCOM, 1991):
//
//	Ps = 1/π ∫_0^{(M−1)π/M} exp(−γs·sin²(π/M) / sin²θ) dθ,   γs = γb·log2(M),
//
// evaluated by Gauss–Legendre quadrature (gonum integrate/quad).
func PSKSER(M int, ebn0DB float64) float64 {
	k := log2M(M)
	gs := FromDB(ebn0DB) * float64(k)
	if k == 0 || math.IsNaN(gs) {
		return math.NaN()
	}
	return 2 * wedge(gs, math.Pi/float64(M))
}

// PSKSERApprox is the usual high-SNR approximation of the M-PSK symbol error rate,
// Ps ≈ 2Q(√(2γs)·sin(π/M)) (Proakis, Digital Communications, 4th ed., 2001, ch. 5), the
// two nearest neighbours' union bound; for M = 2 it is exact when halved (Q(√(2γs))), and this
// function returns that.
func PSKSERApprox(M int, ebn0DB float64) float64 {
	k := log2M(M)
	gs := FromDB(ebn0DB) * float64(k)
	if k == 0 || math.IsNaN(gs) {
		return math.NaN()
	}
	if M == 2 {
		return Q(math.Sqrt(2 * gs))
	}
	return 2 * Q(math.Sqrt(2*gs)*math.Sin(math.Pi/float64(M)))
}

// PSKApprox is the Gray-code approximation of the M-PSK bit error rate, Pb ≈ Ps/log2(M) with
// Ps from PSKSERApprox: at high SNR nearly every symbol error is to a neighbour, which differs
// in one bit.
func PSKApprox(M int, ebn0DB float64) float64 {
	return PSKSERApprox(M, ebn0DB) / float64(log2M(M))
}

// PSK is the exact bit error rate of coherent Gray-labelled M-PSK (binary reflected Gray code
// around the circle). With Pj the probability that the received phase falls in the decision
// sector j steps away from the one sent, and wj the number of bits in which labels j steps
// apart differ, averaged over the M starting points,
//
//	Pb = 1/log2(M) · Σ_{j=1}^{M−1} wj·Pj,
//
// (Lassing, Ström, Agrell and Ottosson, "Computation of the exact bit-error rate of coherent
// M-ary PSK with Gray code bit mapping", IEEE Trans. Commun., 2003). Each Pj is a difference of
// Craig-type wedge probabilities P{φ ∈ (ψ, π)} = 1/(2π) ∫_0^{π−ψ} exp(−γs sin²ψ / sin²θ) dθ,
// computed by quadrature.
func PSK(M int, ebn0DB float64) float64 {
	k := log2M(M)
	gs := FromDB(ebn0DB) * float64(k)
	if k == 0 || math.IsNaN(gs) {
		return math.NaN()
	}
	if M == 2 {
		return Q(math.Sqrt(2 * gs))
	}
	// F[j] = P{φ ∈ ((2j−1)π/M, π)}, j = 1 … M/2.
	h := M / 2
	F := make([]float64, h+1)
	for j := 1; j <= h; j++ {
		F[j] = wedge(gs, float64(2*j-1)*math.Pi/float64(M))
	}
	pb := 0.0
	for j := 1; j < M; j++ {
		jj := min(j, M-j) // sectors j and M−j are mirror images
		var pj float64
		if jj == h {
			pj = 2 * F[h]
		} else {
			pj = F[jj] - F[jj+1]
		}
		pb += pj * grayDistance(M, j)
	}
	return pb / float64(k)
}

// wedge is P{φ ∈ (ψ, π)}: the probability that the phase of √Es + n, n circular Gaussian
// of density N0, lies between ψ and π (0 ≤ ψ ≤ π), by Craig's method.
func wedge(gs, psi float64) float64 {
	s := math.Sin(psi)
	a := gs * s * s
	f := func(t float64) float64 {
		st := math.Sin(t)
		if st == 0 {
			return 0
		}
		return math.Exp(-a / (st * st))
	}
	top := math.Pi - psi
	// The integrand rises from 0 at θ = 0 to its peak exp(−a) at θ = π/2: split there.
	var v float64
	if top > math.Pi/2 {
		v = panels(f, 0, math.Pi/2, 4) + panels(f, math.Pi/2, top, 4)
	} else {
		v = panels(f, 0, top, 4)
	}
	return v / (2 * math.Pi)
}

// grayDistance is the Hamming distance between the binary reflected Gray labels of circle
// positions i and i+j (mod M), averaged over i.
func grayDistance(M, j int) float64 {
	s := 0
	for i := range M {
		a := i ^ (i >> 1)
		n := (i + j) % M
		b := n ^ (n >> 1)
		s += bits.OnesCount(uint(a ^ b))
	}
	return float64(s) / float64(M)
}
