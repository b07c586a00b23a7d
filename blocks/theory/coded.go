package theory

import (
	"math"

	"gonum.org/v1/gonum/stat/combin"
)

// Coded links. Eb/N0 is per information bit: a code of rate R sends each coded bit with energy
// R·Eb, so BPSK's coded-bit error probability on the channel is p = Q(√(2Rγb)).

// binomTerm is C(n, j)·p^j·(1−p)^(n−j), by logarithms so that large n stay finite.
func binomTerm(n, j int, p float64) float64 {
	switch {
	case p == 0:
		if j == 0 {
			return 1
		}
		return 0
	case p == 1:
		if j == n {
			return 1
		}
		return 0
	}
	return math.Exp(combin.LogGeneralizedBinomial(float64(n), float64(j)) +
		float64(j)*math.Log(p) + float64(n-j)*math.Log1p(-p))
}

// HammingWeights is the weight distribution A_0 … A_n of the Hamming code of length
// n = 2^m − 1, from its weight enumerator (Lin and Costello, Error Control Coding, 2nd ed.,
// 2004, §4.1)
//
//	A(z) = [(1 + z)^n + n(1 − z)(1 − z²)^((n−1)/2)] / (n + 1).
//
// The values are exact integers for m ≤ 5 and accurate to about 1e-12 relative beyond (float64
// sums of binomials). nil for m < 2 or m > 10.
func HammingWeights(m int) []float64 {
	if m < 2 || m > 10 {
		return nil
	}
	n := 1<<m - 1
	h := (n - 1) / 2
	a := make([]float64, n+1)
	for w := 0; w <= n; w++ {
		a[w] = combin.GeneralizedBinomial(float64(n), float64(w))
	}
	// n(1 − z)(1 − z²)^h: the term (−1)^i C(h, i) z^(2i), times 1 and times −z.
	for i := 0; i <= h; i++ {
		c := float64(n) * combin.GeneralizedBinomial(float64(h), float64(i))
		if i%2 == 1 {
			c = -c
		}
		a[2*i] += c
		a[2*i+1] -= c
	}
	for w := range a {
		a[w] = math.Round(a[w] / float64(n+1))
	}
	return a
}

// HammingBSC is the exact bit error rate of the Hamming code of length n = 2^m − 1 with
// syndrome decoding, on a binary symmetric channel of crossover probability p. The code is
// perfect, so the decoder turns the received word into the codeword within distance 1 of it;
// the decoded word differs from the sent one by a codeword v exactly when the error pattern lies
// within distance 1 of v. For v of weight w that has probability
//
//	P_w = p^w q^(n−w) + w·p^(w−1) q^(n−w+1) + (n−w)·p^(w+1) q^(n−w−1),  q = 1 − p,
//
// and since the code's automorphism group is transitive on positions, every bit, message bits
// of a systematic encoder included, is wrong with probability Pb = (1/n) Σ_w w·A_w·P_w
// (A_w from HammingWeights). For small p, Pb ≈ 9p² for the (7,4) code.
// NaN for p outside [0, 1] or m outside 2…10.
func HammingBSC(m int, p float64) float64 {
	a := HammingWeights(m)
	if a == nil || !(p >= 0 && p <= 1) {
		return math.NaN()
	}
	n := len(a) - 1
	q := 1 - p
	pb := 0.0
	for w := 1; w <= n; w++ {
		if a[w] == 0 {
			continue
		}
		pw := math.Pow(p, float64(w)) * math.Pow(q, float64(n-w))
		pw += float64(w) * math.Pow(p, float64(w-1)) * math.Pow(q, float64(n-w+1))
		if w < n {
			pw += float64(n-w) * math.Pow(p, float64(w+1)) * math.Pow(q, float64(n-w-1))
		}
		pb += float64(w) * a[w] * pw
	}
	return pb / float64(n)
}

// Hamming74 is the bit error rate of the (7,4) Hamming code on BPSK with hard decisions,
// HammingBSC(3, p) with p = Q(√(2·(4/7)·γb)).
func Hamming74(ebn0DB float64) float64 {
	return HammingBSC(3, BPSK(ebn0DB+ToDB(4.0/7)))
}

// BlockHard is the usual estimate of the decoded bit (or symbol) error rate of a block code of
// length n that corrects t errors, with bounded-distance decoding and independent errors of
// probability p per position (Sklar, Digital Communications, 2nd ed., 2001, eq. 6.46):
//
//	Pb ≈ (1/n) Σ_{j=t+1}^{n} j·C(n, j)·p^j (1 − p)^(n−j),
//
// which assumes that a word with j > t errors leaves the decoder with j errors.
// NaN for p outside [0, 1] or t outside 0…n−1.
func BlockHard(n, t int, p float64) float64 {
	if n < 1 || t < 0 || t >= n || !(p >= 0 && p <= 1) {
		return math.NaN()
	}
	s := 0.0
	for j := t + 1; j <= n; j++ {
		s += float64(j) * binomTerm(n, j, p)
	}
	return s / float64(n)
}

// RS is the bit error rate of a Reed–Solomon code over GF(256) (t = (n − k)/2 byte errors
// corrected) on BPSK with hard decisions. A byte is wrong with probability ps = 1 − (1 − p)^8,
// p = Q(√(2(k/n)γb)); BlockHard(n, t, ps) gives the decoded byte error rate, and a byte wrong
// after a decoding failure (passed on as received) holds 8p/ps wrong bits on average, so
// Pb ≈ BlockHard(n, t, ps)·p/ps. Miscorrections (rare: their probability is below 1/t!,
// McEliece and Swanson, IEEE Trans. Inf. Theory, 1986) are not modelled.
// NaN for bad (n, k).
func RS(n, k int, ebn0DB float64) float64 {
	if n < 2 || n > 255 || k < 1 || k >= n || (n-k)%2 != 0 {
		return math.NaN()
	}
	p := BPSK(ebn0DB + ToDB(float64(k)/float64(n)))
	ps := -math.Expm1(8 * math.Log1p(-p))
	if ps == 0 {
		return 0
	}
	return BlockHard(n, (n-k)/2, ps) * p / ps
}

// Spectrum is the distance spectrum of a convolutional code, for distances d = Free, Free+1, …:
// A[i] error events (paths leaving the zero state and first returning to it) of output weight
// d = Free + i per trellis step, B[i] their total information-bit weight, and the code's rate.
type Spectrum struct {
	Free int       // free distance
	A    []float64 // number of error events of weight Free + i
	B    []float64 // information-bit weight of the error events of weight Free + i
	Rate float64   // code rate R
}

// ConvK7 is the spectrum of the rate-1/2, K = 7 code with generators 133 and 171 (octal), free
// distance 10 (Proakis, Digital Communications, 4th ed., 2001, Table 8.2-1); odd distances have
// no events. The weights are from memory and recomputed from the trellis in the tests of
// package fec.
var ConvK7 = Spectrum{
	Free: 10,
	A:    []float64{11, 0, 38, 0, 193, 0, 1331, 0, 7275, 0, 40406, 0, 234969},
	B:    []float64{36, 0, 211, 0, 1404, 0, 11633, 0, 77433, 0, 502690, 0, 3322763},
	Rate: 0.5,
}

// Event is the union bound on the probability that a soft-decision Viterbi decoder starts an
// error event at a given trellis step, Pe < Σ_d A_d · Q(√(2·d·R·γb)) (Proakis, §8.2-2); a
// frame of L steps is in error with probability below L·Pe.
func (s Spectrum) Event(ebn0DB float64) float64 {
	return s.union(s.A, ebn0DB)
}

// Soft is the union bound on the bit error rate of soft-decision maximum-likelihood (Viterbi)
// decoding on BPSK or Gray QPSK in AWGN (Proakis, Digital Communications, 4th ed., 2001,
// §8.2-2), for a code with one information bit per trellis step:
//
//	Pb < Σ_d B_d · Q(√(2·d·R·γb)).
//
// The sum runs over the listed terms; it is tight at low error rates (above about 4 dB for the
// K = 7 code) and loose, even above 1, at low Eb/N0.
//
// Where the sum exceeds 1/2 the result is NaN (an empty cell in table.csv, a gap in the plot),
// and so for Hard: a decoder that guesses every bit has BER 1/2, so a bound above 1/2 carries
// no information, and clipping it to 0.5 would draw a flat line that reads as a prediction
// (common practice, no source).
func (s Spectrum) Soft(ebn0DB float64) float64 { return informative(s.union(s.B, ebn0DB)) }

// informative is a BER bound, or NaN where it exceeds 1/2 and says nothing.
func informative(pb float64) float64 {
	if pb > 0.5 {
		return math.NaN()
	}
	return pb
}

func (s Spectrum) union(w []float64, ebn0DB float64) float64 {
	g := FromDB(ebn0DB)
	if math.IsNaN(g) || s.Rate <= 0 {
		return math.NaN()
	}
	pb := 0.0
	for i, b := range w {
		if b != 0 {
			pb += b * Q(math.Sqrt(2*float64(s.Free+i)*s.Rate*g))
		}
	}
	return pb
}

// Hard is the union bound on the bit error rate of hard-decision Viterbi decoding on BPSK,
// Pb < Σ_d B_d·P_d, with P_d the probability that a path at distance d wins on a binary
// symmetric channel of crossover p = Q(√(2Rγb)) (Proakis, §8.2-3): for odd d,
// P_d = Σ_{k=(d+1)/2}^{d} C(d, k) p^k (1−p)^(d−k); for even d, ties count half,
// P_d = ½ C(d, d/2) p^(d/2) (1−p)^(d/2) + Σ_{k=d/2+1}^{d} C(d, k) p^k (1−p)^(d−k).
// NaN where the sum exceeds 1/2, as for Soft.
func (s Spectrum) Hard(ebn0DB float64) float64 {
	if math.IsNaN(ebn0DB) || s.Rate <= 0 {
		return math.NaN()
	}
	p := BPSK(ebn0DB + ToDB(s.Rate))
	pb := 0.0
	for i, b := range s.B {
		if b == 0 {
			continue
		}
		d := s.Free + i
		pd := 0.0
		for k := d/2 + 1; k <= d; k++ {
			pd += binomTerm(d, k, p)
		}
		if d%2 == 0 {
			pd += 0.5 * binomTerm(d, d/2, p)
		}
		pb += b * pd
	}
	return informative(pb)
}

// ConvK7Soft is ConvK7.Soft, the soft-decision union bound of the K = 7, 133/171 code.
func ConvK7Soft(ebn0DB float64) float64 { return ConvK7.Soft(ebn0DB) }

// ConvK7Hard is ConvK7.Hard, the hard-decision union bound of the K = 7, 133/171 code.
func ConvK7Hard(ebn0DB float64) float64 { return ConvK7.Hard(ebn0DB) }
