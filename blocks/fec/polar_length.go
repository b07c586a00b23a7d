package fec

import (
	"fmt"
	"math"
	"math/bits"
)

// Polar codes of any length: a mother code of length N = 2^⌈log2 n⌉ of which n coded bits
// are sent, the other P = N − n removed one of two ways.
//
// Puncturing (PolarPunctured): the P removed bits are not sent and the decoder knows nothing of
// them (LLR 0). They are chosen by quasi-uniform puncturing (Niu, Chen and Lin, Beyond turbo
// codes: rate-compatible punctured polar codes, IEEE ICC 2013): the coded positions bitrev(j),
// j = 0 … P−1, spread evenly over the word. With x = u·G and G = B_N·F^{⊗m}, and B_N·F^{⊗m} =
// F^{⊗m}·B_N, the bit at position bitrev(j) is (u·F^{⊗m})_j = Σ_{i ⊇ j} u_i, so the message
// positions u_0 … u_{P−1} appear in punctured bits only: they carry nothing and are frozen.
//
// Shortening (PolarShortened): the removed bits are fixed to 0 by frozen bits, so they need not
// be sent and the decoder knows them exactly (LLR +∞). The positions are bitrev(j),
// j = N−P … N−1, the last P in bit-reversed order, with u_{N−P} … u_{N−1} frozen: every u_i in
// Σ_{i ⊇ j} u_i then has i ≥ j ≥ N−P, so those bits are 0 whatever the message (Wang and Liu,
// A novel puncturing scheme for polar codes, IEEE Commun. Lett. 18(12), 2014, whose removed bits
// are likewise known to the decoder and fixed by frozen bits; this choice of positions is ours
// by that rule, not copied from the paper).
//
// Construction accounts for the removed bits: the Gaussian approximation starts from the mean
// LLR of each coded position (4·R·Eb/N0 sent, 0 punctured, ∞ shortened, R = K/n) and follows
// Arıkan's recursion on the two halves of the word (Channel polarization, 2009, eq. (22)): a
// mean a of the first half and b of the second give the check-node channel
// φ⁻¹(1 − (1 − φ(a))(1 − φ(b))) and the variable-node channel a + b. Puncturing is the better
// choice at low rates, shortening at high rates (common practice, no source).

// PolarPunctured is a polar code of n coded bits (4…65536, any length) and k message bits: the
// mother code of length 2^⌈log2 n⌉ punctured quasi-uniformly (see above), designed for Eb/N0 =
// 2 dB, without CRC. CRC, Design and the decoders work as on Polar.
func PolarPunctured(n, k int) *PolarCode { return polarLength(n, k, false) }

// PolarShortened is a polar code of n coded bits (4…65536, any length) and k message bits: the
// mother code of length 2^⌈log2 n⌉ shortened (see above), designed for Eb/N0 = 2 dB, without
// CRC. CRC, Design and the decoders work as on Polar.
func PolarShortened(n, k int) *PolarCode { return polarLength(n, k, true) }

func polarLength(n, k int, shorten bool) *PolarCode {
	how := "PolarPunctured"
	if shorten {
		how = "PolarShortened"
	}
	c := &PolarCode{K: k, Sent: n, DesignSNR: 2, name: fmt.Sprintf("fec.%s(%d, %d)", how, n, k)}
	switch {
	case n < 4 || n > 1<<16:
		c.err = fmt.Errorf("%s: n = %d must lie in 4…65536", c.name, n)
	case k < 1 || k >= n:
		c.err = fmt.Errorf("%s: k = %d must lie in 1…n−1", c.name, k)
	}
	if c.err != nil {
		return c
	}
	c.m = bits.Len(uint(n - 1))
	c.N = 1 << c.m
	p := c.N - n
	c.removed = make([]int8, c.N)
	c.forced = make([]bool, c.N)
	for j := 0; j < p; j++ {
		i := j // puncturing: u_0 … u_{P−1}
		if shorten {
			i = c.N - 1 - j // shortening: u_{N−P} … u_{N−1}
		}
		pos := int(bits.Reverse32(uint32(i)) >> (32 - c.m))
		c.forced[i] = true
		c.removed[pos] = removedPunctured
		if shorten {
			c.removed[pos] = removedShortened
		}
	}
	c.sent = make([]int32, 0, n)
	for pos, r := range c.removed {
		if r == 0 {
			c.sent = append(c.sent, int32(pos))
		}
	}
	c.construct()
	return c
}

const (
	removedPunctured = 1 // not sent, unknown to the decoder
	removedShortened = 2 // not sent, known to be 0
)

// shortLLR is the LLR the decoder gives a shortened bit: known to be 0, finite so that the
// decoder's sums stay numbers.
const shortLLR = 1e12

// channelMeans are the mean LLRs of the N coded positions at Eb/N0 (dB): 4·R·Eb/N0 for a sent
// bit, 0 for a punctured one, +∞ for a shortened one.
func (c *PolarCode) channelMeans(ebn0DB float64) []float64 {
	mu0 := 4 * c.Rate() * math.Pow(10, ebn0DB/10)
	ch := make([]float64, c.N)
	for i := range ch {
		switch c.removed[i] {
		case removedPunctured:
			ch[i] = 0
		case removedShortened:
			ch[i] = math.Inf(1)
		default:
			ch[i] = mu0
		}
	}
	return ch
}

// meansOf are the mean LLRs of the synthetic channels of u for coded positions of mean LLRs
// ch, by Arıkan's recursion on the halves of the word (see above).
func meansOf(ch []float64) []float64 {
	n := len(ch)
	if n == 1 {
		return []float64{ch[0]}
	}
	a, b := meansOf(ch[:n/2]), meansOf(ch[n/2:])
	out := make([]float64, n)
	for i := range a {
		out[2*i] = checkMean(a[i], b[i])
		out[2*i+1] = a[i] + b[i]
	}
	return out
}

// checkMean is the mean of the check-node channel of two channels of means a and b under the
// Gaussian approximation, φ⁻¹(1 − (1 − φ(a))(1 − φ(b))) = φ⁻¹(φa + φb − φa·φb), by logarithms.
func checkMean(a, b float64) float64 {
	switch {
	case a == 0 || b == 0:
		return 0
	case math.IsInf(a, 1):
		return b
	case math.IsInf(b, 1):
		return a
	}
	la, lb := logPhi(a), logPhi(b)
	hi, lo := max(la, lb), min(la, lb)
	return invLogPhi(hi + math.Log(1+math.Exp(lo-hi)-math.Exp(lo)))
}
