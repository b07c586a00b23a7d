package fec

import (
	"fmt"
	"math"
	"math/bits"
	"sort"

	"tally/blocks/link"
	"tally/blocks/rng"
)

// PolarCode is a polar code of length N = 2^m with K message bits (Arıkan, Channel polarization,
// IEEE Trans. Inf. Theory, 2009), optionally with a CRC appended to the message for CRC-aided
// list decoding, decoded by successive cancellation (SC) or SC list decoding (PolarDecoder).
//
// Construction: the K + CRC most reliable of the N synthetic channels carry the message and CRC
// bits, the others are frozen to 0. Reliability is judged by the Gaussian approximation at the
// design Eb/N0 (Trifonov, Efficient design and decoding of polar codes, IEEE Trans. Commun.,
// 2012): the channel LLR is taken as Gaussian with mean μ₀ = 4·R·Eb/N0 (variance twice the
// mean), and each polarisation step turns a mean μ into
//
//	μ⁻ = φ⁻¹(1 − (1 − φ(μ))²)   (the check-node channel),   μ⁺ = 2μ   (the variable-node channel),
//
// with φ(x) = exp(−0.4527·x^0.86 + 0.0218) for x < 10 and √(π/x)·e^(−x/4)·(1 − 10/(7x)) above
// (Chung, Richardson and Urbanke, Analysis of sum-product decoding of LDPC codes using a Gaussian
// approximation, IEEE Trans. Inf. Theory, 2001), computed by logarithms so the large means of the
// good channels stay exact. The design Eb/N0 defaults to 2 dB (Design to change it).
//
// Encoding is x = u·G with G the m-fold Kronecker power of [[1 0] [1 1]] in the bit-reversed
// order of Tal and Vardy's decoder (the same order throughout, so the frozen set and decoder
// agree); the message and CRC bits sit in u at the information positions in increasing order.
// The code is not systematic: a frame error usually costs about half the message bits.
//
// Frames must hold a multiple of K bits (encoder) and Sent coded bits (decoder).
type PolarCode struct {
	N, K      int     // length of the (mother) code and message bits
	Sent      int     // coded bits sent per word: N, or fewer when punctured or shortened
	CRCBits   int     // CRC length (0: none)
	DesignSNR float64 // design Eb/N0 in dB

	m      int
	frozen []bool
	info   []int32 // information positions (message then CRC), increasing
	crc    uint32  // CRC polynomial without its leading term
	name   string
	err    error

	// Punctured or shortened codes (polar_length.go); nil for a code of length N.
	removed []int8  // per coded position: 0 sent, removedPunctured or removedShortened
	forced  []bool  // per position of u: frozen because of the removed bits
	sent    []int32 // the coded positions sent, increasing
}

// Polar is the polar code of length n (a power of two, 4…65536) with k message bits, designed
// for Eb/N0 = 2 dB, without CRC. PolarPunctured and PolarShortened make codes of other lengths.
func Polar(n, k int) *PolarCode {
	c := &PolarCode{N: n, K: k, Sent: n, DesignSNR: 2, name: fmt.Sprintf("fec.Polar(%d, %d)", n, k)}
	switch {
	case n < 4 || n > 1<<16 || n&(n-1) != 0:
		c.err = fmt.Errorf("%s: n = %d must be a power of two in 4…65536 (fec.PolarPunctured or fec.PolarShortened for other lengths)", c.name, n)
	case k < 1 || k >= n:
		c.err = fmt.Errorf("%s: k = %d must lie in 1…n−1", c.name, k)
	}
	if c.err != nil {
		return c
	}
	c.m = bits.TrailingZeros(uint(n))
	c.construct()
	return c
}

// crcPolys are CRC generator polynomials (leading term left out), bit i the coefficient of xⁱ:
// CRC-6, CRC-11, CRC-16 and CRC-24 of 3GPP TS 38.212, §5.1 (gCRC6, gCRC11, gCRC16, gCRC24C),
// and CRC-8 of ITU-T I.432.1 (x⁸ + x² + x + 1).
var crcPolys = map[int]uint32{
	6: 0x21, 8: 0x07, 11: 0x621, 16: 0x1021, 24: 0xb2b117,
}

// CRC appends a CRC of the given length (6, 8, 11, 16 or 24 bits) to each message, for
// CRC-aided list decoding; the code keeps N and K, so the rate stays K/N.
func (c *PolarCode) CRC(length int) *PolarCode {
	p, ok := crcPolys[length]
	if c.err != nil {
		return c
	}
	if !ok {
		c.err = fmt.Errorf("%s: CRC(%d) must be one of 6, 8, 11, 16, 24", c.name, length)
		return c
	}
	if c.K+length >= c.Sent {
		c.err = fmt.Errorf("%s: CRC(%d) leaves no frozen bit", c.name, length)
		return c
	}
	c.CRCBits, c.crc = length, p
	c.construct()
	return c
}

// Design sets the Eb/N0 in dB the code is built for (default 2).
func (c *PolarCode) Design(ebn0DB float64) *PolarCode {
	if c.err != nil {
		return c
	}
	if math.IsNaN(ebn0DB) || ebn0DB < -10 || ebn0DB > 30 {
		c.err = fmt.Errorf("%s: Design(%v) must lie in −10…30 dB", c.name, ebn0DB)
		return c
	}
	c.DesignSNR = ebn0DB
	c.construct()
	return c
}

// Err reports bad parameters.
func (c *PolarCode) Err() error { return c.err }

// Rate is K/Sent: K/N, or K/n for a punctured or shortened code of n coded bits.
func (c *PolarCode) Rate() float64 {
	if c.Sent == 0 {
		return 1
	}
	return float64(c.K) / float64(c.Sent)
}

// Frozen reports which positions of u are frozen to 0.
func (c *PolarCode) Frozen() []bool { return append([]bool(nil), c.frozen...) }

// logPhi is log φ(x) of the Gaussian approximation.
func logPhi(x float64) float64 {
	if x <= 0 {
		return 0
	}
	if x < 10 {
		return -0.4527*math.Pow(x, 0.86) + 0.0218
	}
	return 0.5*math.Log(math.Pi/x) - x/4 + math.Log1p(-10/(7*x))
}

// invLogPhi finds x with log φ(x) = y (y < 0) by bisection; log φ decreases in x.
func invLogPhi(y float64) float64 {
	if y >= 0 {
		return 0
	}
	lo, hi := 0.0, 1.0
	for logPhi(hi) > y {
		lo, hi = hi, 2*hi
	}
	for i := 0; i < 100 && hi-lo > 1e-12*hi; i++ {
		mid := 0.5 * (lo + hi)
		if logPhi(mid) > y {
			lo = mid
		} else {
			hi = mid
		}
	}
	return 0.5 * (lo + hi)
}

// means are the mean LLRs of the N synthetic channels at Eb/N0 (dB) by the Gaussian
// approximation.
func (c *PolarCode) means(ebn0DB float64) []float64 {
	if c.removed != nil {
		return meansOf(c.channelMeans(ebn0DB))
	}
	mu := make([]float64, 1, c.N)
	mu[0] = 4 * c.Rate() * math.Pow(10, ebn0DB/10)
	for l := 0; l < c.m; l++ {
		next := make([]float64, 2*len(mu))
		for psi, z := range mu {
			// 1 − (1 − φ)² = φ(2 − φ), by logarithms.
			lp := logPhi(z)
			next[2*psi] = invLogPhi(lp + math.Log(2-math.Exp(lp)))
			next[2*psi+1] = 2 * z
		}
		mu = next
	}
	return mu
}

// construct picks the information positions by the Gaussian approximation.
func (c *PolarCode) construct() {
	n := c.N
	mu := c.means(c.DesignSNR)
	order := make([]int, n)
	for i := range order {
		order[i] = i
	}
	if c.forced != nil { // positions fixed by punctured or shortened bits rank last
		for i, f := range c.forced {
			if f {
				mu[i] = math.Inf(-1)
			}
		}
	}
	sort.SliceStable(order, func(a, b int) bool { return mu[order[a]] > mu[order[b]] })
	c.frozen = make([]bool, n)
	for i := range c.frozen {
		c.frozen[i] = true
	}
	for _, i := range order[:c.K+c.CRCBits] {
		c.frozen[i] = false
	}
	c.info = c.info[:0]
	for i, f := range c.frozen {
		if !f {
			c.info = append(c.info, int32(i))
		}
	}
}

// EstimateSC is the frame error rate of SC decoding at Eb/N0 (dB) that the Gaussian
// approximation predicts, Σ Q(√(μ_i/2)) over the information positions i (each synthetic
// channel's error probability with the bits before it known; Trifonov 2012, §II, and Arıkan 2009,
// Proposition 2, for the sum as an upper bound on the SC frame error rate). It is the estimate
// the construction ranks channels by, close to simulation where it is below about 0.1. NaN for a
// code with bad parameters.
func (c *PolarCode) EstimateSC(ebn0DB float64) float64 {
	if c.err != nil {
		return math.NaN()
	}
	mu := c.means(ebn0DB)
	s := 0.0
	for _, i := range c.info {
		s += 0.5 * math.Erfc(math.Sqrt(mu[i]/2)/math.Sqrt2)
	}
	return math.Min(s, 1)
}

// crcOf is the CRC of bits (one per byte), register starting at 0, most significant first.
func (c *PolarCode) crcOf(msg []byte) uint32 {
	l := uint(c.CRCBits)
	top := uint32(1) << (l - 1)
	mask := uint32(1)<<l - 1
	var r uint32
	for _, b := range msg {
		fb := (r&top != 0) != (b&1 != 0)
		r = r << 1 & mask
		if fb {
			r ^= c.crc
		}
	}
	return r
}

// polarTree holds the partial-sum arrays of one path: layer λ has 2^(m−λ) pairs.
// encodeInto runs the partial-sum update of the decoder with every bit known: u (N bits) to the
// codeword x (N bits); c is scratch of 2N+2 bytes laid out by layer.
func (c *PolarCode) encodeInto(u, x []byte, s []byte) {
	m := c.m
	for phi := 0; phi < c.N; phi++ {
		s[cIndex(m, m, 0, phi&1)] = u[phi]
		if phi&1 == 1 {
			updateC(s, m, m, phi)
		}
	}
	for b := 0; b < c.N; b++ {
		x[b] = s[cIndex(m, 0, b, 0)]
	}
}

// cIndex locates C_λ[β][bit] in a flat array: layer λ starts at 2·(2^(m+1) − 2^(m−λ+1))/2.
func cIndex(m, lambda, beta, bit int) int {
	off := 2 * (1<<(m+1) - 1<<(m-lambda+1))
	return off + 2*beta + bit
}

// updateC propagates the pair of bits decided at layer λ for phase phi down the layers.
func updateC(s []byte, m, lambda, phi int) {
	for {
		psi := phi >> 1
		size := 1 << (m - lambda)
		hi := cIndex(m, lambda, 0, 0)
		lo := cIndex(m, lambda-1, 0, 0)
		bit := psi & 1
		for b := 0; b < size; b++ {
			u0, u1 := s[hi+2*b], s[hi+2*b+1]
			s[lo+2*(2*b)+bit] = u0 ^ u1
			s[lo+2*(2*b+1)+bit] = u1
		}
		if psi&1 == 0 || lambda == 1 {
			return
		}
		lambda--
		phi = psi
	}
}

// Encode writes the N-bit codeword of the K-bit message msg (one bit per byte) to x: the
// mother code's word, removed bits included (the encoder block sends only Sent of them).
func (c *PolarCode) Encode(msg, x []byte) {
	u := make([]byte, c.N)
	s := make([]byte, 4*c.N)
	c.encode(msg, x, u, s)
}

func (c *PolarCode) encode(msg, x, u, s []byte) {
	clear(u)
	for j, p := range c.info[:c.K] {
		u[p] = msg[j] & 1
	}
	if c.CRCBits > 0 {
		r := c.crcOf(msg[:c.K])
		for j, p := range c.info[c.K:] {
			u[p] = byte(r >> uint(c.CRCBits-1-j) & 1)
		}
	}
	c.encodeInto(u, x, s)
}

// Encoder is the block that encodes each K bits of f.Coded.
func (c *PolarCode) Encoder() *PolarEncoder { return &PolarEncoder{code: c} }

// PolarEncoder is the encoding block of a polar code.
type PolarEncoder struct {
	code   *PolarCode
	u, s   []byte
	x, out []byte
}

// Name names the block in messages.
func (e *PolarEncoder) Name() string { return e.code.name + " encoder" }

// Err reports bad parameters.
func (e *PolarEncoder) Err() error { return e.code.err }

// Rate is K/Sent.
func (e *PolarEncoder) Rate() float64 { return e.code.Rate() }

// Process encodes f.Coded.
func (e *PolarEncoder) Process(f *link.Frame, _ *rng.Stream) error {
	c := e.code
	if err := multiple(len(f.Coded), c.K, "bits"); err != nil {
		return err
	}
	words := len(f.Coded) / c.K
	e.u = link.GrowBytes(e.u, c.N)
	e.s = link.GrowBytes(e.s, 4*c.N)
	e.out = link.GrowBytes(e.out, words*c.Sent)
	if c.sent == nil {
		for w := 0; w < words; w++ {
			c.encode(f.Coded[w*c.K:(w+1)*c.K], e.out[w*c.N:(w+1)*c.N], e.u, e.s)
		}
	} else {
		e.x = link.GrowBytes(e.x, c.N)
		for w := 0; w < words; w++ {
			c.encode(f.Coded[w*c.K:(w+1)*c.K], e.x, e.u, e.s)
			out := e.out[w*c.Sent : (w+1)*c.Sent]
			for i, p := range c.sent {
				out[i] = e.x[p]
			}
		}
	}
	f.Coded = e.out
	f.CodeRate *= c.Rate()
	return nil
}
