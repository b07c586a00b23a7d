// Package theory holds closed-form and numerically exact error rates of uncoded modulations in
// additive white Gaussian noise, to draw beside Monte Carlo curves and to check them.
//
// Every function takes Eb/N0 in dB, the energy per information bit over the one-sided noise
// density, and returns a probability (BER, or SER where the name says so). Write γb = Eb/N0 and
// γs = Es/N0 = γb·log2(M) in linear units. Constellations are Gray labelled, detection is
// maximum likelihood per symbol (nearest point) unless stated. A parameter outside a function's
// range (M not a power of two, a non-square QAM order, NaN) gives NaN rather than a panic, so a
// theory curve with a typo shows as a gap, not a crash.
package theory

import (
	"math"
	"math/bits"
)

// FromDB converts a ratio in dB to linear units, 10^(dB/10).
func FromDB(db float64) float64 { return math.Pow(10, db/10) }

// ToDB converts a linear power ratio to dB, 10·log10(x).
func ToDB(x float64) float64 { return 10 * math.Log10(x) }

// Q is the Gaussian tail probability Q(x) = P(N(0,1) > x) = erfc(x/√2)/2.
func Q(x float64) float64 { return 0.5 * math.Erfc(x/math.Sqrt2) }

// QInv is the inverse of Q: the x with Q(x) = p, for 0 < p < 1 (NaN outside).
func QInv(p float64) float64 {
	if !(p > 0 && p < 1) {
		return math.NaN()
	}
	return math.Sqrt2 * math.Erfcinv(2*p)
}

// log2M returns log2(M) when M ≥ 2 is a power of two, and 0 otherwise.
func log2M(M int) int {
	if M < 2 || M&(M-1) != 0 {
		return 0
	}
	return bits.TrailingZeros(uint(M))
}
