package theory

import "math"

// BPSK is the bit error rate of coherent BPSK, Pb = Q(√(2γb)).
func BPSK(ebn0DB float64) float64 { return Q(math.Sqrt(2 * FromDB(ebn0DB))) }

// QPSK is the bit error rate of coherent Gray-labelled QPSK, the same as BPSK per bit:
// Pb = Q(√(2γb)).
func QPSK(ebn0DB float64) float64 { return BPSK(ebn0DB) }

// QPSKSER is the symbol error rate of coherent QPSK, Ps = 2Q(√γs) − Q(√γs)², γs = 2γb.
func QPSKSER(ebn0DB float64) float64 {
	q := Q(math.Sqrt(2 * FromDB(ebn0DB)))
	return 2*q - q*q
}

// OOK is the bit error rate of coherent on-off keying with the midpoint threshold: the "on"
// amplitude A = √2 and "off" 0, so the average symbol energy is Es = Eb = 1 (half the peak
// energy A²), and the threshold A/2 is the maximum-likelihood one for equiprobable bits.
// Then Pb = Q(A/(2σ)) with σ² = N0/2, that is Pb = Q(√γb) with Eb the average energy per bit
// (Q(√(Ep/(2N0))) in terms of the peak energy Ep = 2Eb).
func OOK(ebn0DB float64) float64 { return Q(math.Sqrt(FromDB(ebn0DB))) }

// BFSK is the bit error rate of coherent binary FSK with orthogonal tones, Pb = Q(√γb)
// (Proakis, Digital Communications, 4th ed., 2001, ch. 5).
func BFSK(ebn0DB float64) float64 { return Q(math.Sqrt(FromDB(ebn0DB))) }

// BFSKNoncoherent is the bit error rate of binary orthogonal FSK detected by comparing tone
// energies (envelope detection), Pb = ½·exp(−γb/2) (Proakis, Digital Communications,
// 4th ed., 2001, ch. 5).
func BFSKNoncoherent(ebn0DB float64) float64 { return 0.5 * math.Exp(-FromDB(ebn0DB)/2) }
