package theory

import "math"

// DEBPSK is the bit error rate of differentially encoded BPSK with coherent detection followed
// by differential decoding (the XOR of successive hard decisions),
//
//	Pb = 2p(1 − p),   p = Q(√(2γb)),
//
// since a decoded bit is wrong exactly when one, not both, of the two symbol decisions it uses
// is wrong (Proakis and Salehi, Digital Communications, 5th ed., 2008, ch. 4; Simon, Hinedi
// and Lindsey, Digital Communication Techniques: Signal Design and Detection, 1995). The
// reference symbol each frame starts with is not charged.
func DEBPSK(ebn0DB float64) float64 {
	p := Q(math.Sqrt(2 * FromDB(ebn0DB)))
	return 2 * p * (1 - p)
}

// DEQPSK is the bit error rate of Gray-labelled differentially encoded QPSK with coherent
// detection followed by differential decoding (the data label l advances the quadrant by δ = 0,
// 1, 2, 3 for l = 00, 01, 11, 10; the receiver decodes gray(q̂_i − q̂_{i−1} mod 4)), per bit
// the same form as DEBPSK,
//
//	Pb = 2p(1 − p),   p = Q(√(2γb)) the error rate of each rail (Es = 2Eb).
//
// Derivation: the two rails err independently with probability p, so the quadrant decision is
// off by e = 0, +1, −1, 2 with probabilities (1−p)², p(1−p), p(1−p), p², whatever quadrant was
// sent, independently from symbol to symbol. The decoded step is off by ε = e_i − e_{i−1}
// mod 4, which costs one bit for ε = ±1 and two for ε = 2 (Gray steps); with a = (1−p)²,
// b = p(1−p), c = p², P(ε = ±1) = 4b(a + c) and P(ε = 2) = 2ac + 2b², so per bit
// Pb = 2b(a + c) + 2ac + 2b² = 2p(1 − p). (The same result as for two independent DE-BPSK
// rails; compare Simon, Hinedi and Lindsey, 1995, on differentially encoded QPSK.)
func DEQPSK(ebn0DB float64) float64 { return DEBPSK(ebn0DB) }
