package fec

import (
	"fmt"
	"math/bits"

	"tally/blocks/link"
	"tally/blocks/rng"
)

// BCHCode is a binary primitive BCH code of length 2^m − 1, or one shortened from it, with
// hard-decision bounded-distance decoding; the usual outer code around an LDPC or polar code.
//
// The narrow-sense code that corrects t errors has the generator g(x), the least common multiple
// of the minimal polynomials of α, α², …, α^(2t) over GF(2), α a root of the primitive
// polynomial of degree m (Lin and Costello, Error Control Coding, 2nd ed., 2004, §6.1; the
// field polynomials are their Table 2.7's). BCH(n, k) picks m as the least with 2^m − 1 ≥ n and
// the t whose generator has degree n − k; n < 2^m − 1 shortens the code by 2^m − 1 − n leading
// message bits that are zero and not sent.
//
// Encoding is systematic: k message bits, then the n − k parity bits, the remainder of
// m(x)·x^(n−k) by g(x), highest degree first (bit i of a word is the coefficient of x^(n−1−i)).
// The decoder computes the syndromes S_j = r(α^j), j = 1…2t, finds the error locator by
// Berlekamp–Massey and its roots by Chien search (Lin and Costello, §6.2–6.3), and flips the
// bits found. It corrects every pattern of up to t errors; a word whose locator has fewer roots
// among the sent positions than its degree is passed on as received and counted by Detected;
// beyond t errors it may also decode to a wrong codeword (bounded-distance decoding).
//
// Frames must hold a multiple of k bits (encoder) and of n bits (decoder).
type BCHCode struct {
	N, K, T int    // length, message bits, correctable errors
	M       int    // field degree: the mother code has length 2^M − 1
	Gen     []byte // generator coefficients, Gen[i] of xⁱ, Gen[N−K] = 1

	gf    *binField
	genW  []uint64 // Gen without its leading term, packed 64 coefficients a word
	words int      // words of the parity register
	name  string
	err   error
}

// BCH is the binary BCH code BCH(n, k): primitive when n = 2^m − 1, shortened otherwise, for
// example BCH(15, 7) (t = 2), BCH(255, 239) (t = 2) or BCH(1023, 993) (t = 3).
func BCH(n, k int) *BCHCode {
	c := &BCHCode{N: n, K: k, name: fmt.Sprintf("fec.BCH(%d, %d)", n, k)}
	if n < 7 || n > 1<<16-1 {
		c.err = fmt.Errorf("%s: n = %d must lie in 7…65535", c.name, n)
		return c
	}
	if k < 1 || k >= n {
		c.err = fmt.Errorf("%s: k = %d must lie in 1…n−1", c.name, k)
		return c
	}
	c.M = bits.Len(uint(n))
	gf, err := newBinField(c.M)
	if err != nil {
		c.err = fmt.Errorf("%s: %v", c.name, err)
		return c
	}
	c.gf = gf
	q := gf.q
	// Multiply in the minimal polynomial of each new cyclotomic coset α^j, j odd, until the
	// degree reaches n − k.
	g := []byte{1}
	seen := make([]bool, q)
	for t := 1; ; t++ {
		j := 2*t - 1
		if j >= q {
			break
		}
		if !seen[j] {
			// The coset {j, 2j, 4j, …} mod q and its minimal polynomial Π (x − α^e).
			poly := []uint16{1}
			for e := j; !seen[e]; e = 2 * e % q {
				seen[e] = true
				r := gf.pow(e)
				next := make([]uint16, len(poly)+1)
				for i, a := range poly {
					next[i+1] ^= a
					next[i] ^= gf.mul(a, r)
				}
				poly = next
			}
			prod := make([]byte, len(g)+len(poly)-1)
			for i, a := range g {
				if a == 0 {
					continue
				}
				for l, b := range poly {
					prod[i+l] ^= byte(b) // coefficients of a minimal polynomial are 0 or 1
				}
			}
			g = prod
		}
		if len(g)-1 == n-k {
			c.T, c.Gen = t, g
			break
		}
		if len(g)-1 > n-k {
			break
		}
	}
	if c.Gen == nil {
		c.err = fmt.Errorf("%s: no BCH code of length %d has %d parity bits (from GF(2^%d); BCH(%d, %d) corrects 1 error, BCH(%d, %d) 2)",
			c.name, n, n-k, c.M, n, n-c.M, n, n-2*c.M)
		return c
	}
	r := n - k
	c.words = (r + 63) / 64
	c.genW = make([]uint64, c.words)
	for i := 0; i < r; i++ {
		c.genW[i/64] |= uint64(c.Gen[i]) << (i % 64)
	}
	return c
}

// Err reports a bad (n, k).
func (c *BCHCode) Err() error { return c.err }

// Rate is k/n.
func (c *BCHCode) Rate() float64 { return float64(c.K) / float64(c.N) }

// Encode writes the n-bit codeword of the k-bit message msg (one bit per byte) to cw.
func (c *BCHCode) Encode(msg, cw []byte) {
	var small [4]uint64
	reg := small[:]
	if c.words > len(small) {
		reg = make([]uint64, c.words)
	}
	c.encode(msg, cw, reg[:c.words])
}

func (c *BCHCode) encode(msg, cw []byte, reg []uint64) {
	r := c.N - c.K
	clear(reg)
	top, tb := (r-1)/64, uint((r-1)%64)
	mask := ^uint64(0) >> (63 - tb)
	w := len(reg)
	for _, u := range msg[:c.K] {
		fb := uint64(u&1) ^ reg[top]>>tb&1
		for i := w - 1; i > 0; i-- {
			reg[i] = reg[i]<<1 | reg[i-1]>>63
		}
		reg[0] <<= 1
		reg[top] &= mask
		if fb != 0 {
			for i, g := range c.genW {
				reg[i] ^= g
			}
		}
	}
	copy(cw, msg[:c.K])
	par := cw[c.K:c.N]
	for j := range par {
		b := r - 1 - j
		par[j] = byte(reg[b/64] >> (b % 64) & 1)
	}
}

// bchScratch holds a decoder's working polynomials, so decoding allocates nothing.
type bchScratch struct {
	syn               []uint16 // S_1 … S_2t at index 1…2t
	lambda, prev, tmp []uint16
	terms             []uint16
}

func (c *BCHCode) scratch() *bchScratch {
	t2 := 2*c.T + 2
	return &bchScratch{syn: make([]uint16, t2), lambda: make([]uint16, t2), prev: make([]uint16, t2),
		tmp: make([]uint16, t2), terms: make([]uint16, t2)}
}

// Decode corrects the n-bit word cw (one bit per byte) in place. It returns the number of
// errors corrected, or −1 when it finds the word uncorrectable (cw is then left as received).
func (c *BCHCode) Decode(cw []byte) int { return c.decode(cw, c.scratch()) }

func (c *BCHCode) decode(cw []byte, s *bchScratch) int {
	gf, n, t := c.gf, c.N, c.T
	q := gf.q
	cw = cw[:n]
	// Odd syndromes by summing α^(j·e) over the received ones (e = n − 1 − i), even ones as
	// squares: S_2j = S_j² over GF(2^m).
	syn := s.syn
	clear(syn)
	for i, b := range cw {
		if b&1 == 0 {
			continue
		}
		e := n - 1 - i
		for j := 1; j <= 2*t; j += 2 {
			syn[j] ^= gf.exp[j*e%q]
		}
	}
	zero := true
	for j := 1; j <= 2*t; j++ {
		if j%2 == 0 {
			syn[j] = gf.mul(syn[j/2], syn[j/2])
		}
		if syn[j] != 0 {
			zero = false
		}
	}
	if zero {
		return 0
	}
	// Berlekamp–Massey: the shortest LFSR Λ(x) that generates S_1 … S_2t.
	lam, prev, tmp := s.lambda, s.prev, s.tmp
	clear(lam)
	clear(prev)
	lam[0], prev[0] = 1, 1
	L, shift := 0, 1
	b := uint16(1)
	for r := 0; r < 2*t; r++ {
		d := syn[r+1]
		for i := 1; i <= L; i++ {
			d ^= gf.mul(lam[i], syn[r+1-i])
		}
		if d == 0 {
			shift++
			continue
		}
		coef := gf.mul(d, gf.inv(b))
		if 2*L <= r {
			copy(tmp, lam)
			for i := 0; i+shift < len(lam); i++ {
				lam[i+shift] ^= gf.mul(coef, prev[i])
			}
			L = r + 1 - L
			copy(prev, tmp)
			b, shift = d, 1
		} else {
			for i := 0; i+shift < len(lam); i++ {
				lam[i+shift] ^= gf.mul(coef, prev[i])
			}
			shift++
		}
	}
	if L > t {
		return -1
	}
	// Chien search over the sent positions: an error at exponent e makes Λ(α^(−e)) = 0. The
	// terms λ_j·α^(−j·e) are stepped by α^(−j) from e = 0.
	terms := s.terms[:L+1]
	copy(terms, lam[:L+1])
	found := 0
	for e := 0; e < n; e++ {
		var sum uint16
		for _, v := range terms {
			sum ^= v
		}
		if sum == 0 {
			found++
		}
		for j := 1; j <= L; j++ {
			if terms[j] != 0 {
				terms[j] = gf.exp[(int(gf.log[terms[j]])+q-j)%q]
			}
		}
	}
	if found != L {
		return -1
	}
	copy(terms, lam[:L+1])
	for e := 0; e < n; e++ {
		var sum uint16
		for _, v := range terms {
			sum ^= v
		}
		if sum == 0 {
			cw[n-1-e] ^= 1
		}
		for j := 1; j <= L; j++ {
			if terms[j] != 0 {
				terms[j] = gf.exp[(int(gf.log[terms[j]])+q-j)%q]
			}
		}
	}
	return L
}

// Encoder is the block that encodes each k bits of f.Coded.
func (c *BCHCode) Encoder() *BCHEncoder { return &BCHEncoder{code: c} }

// Decoder is the block that decodes f.Hard (or an inner decoder's f.Out) to f.Out.
func (c *BCHCode) Decoder() *BCHDecoder { return &BCHDecoder{code: c} }

// BCHEncoder is the encoding block of a BCH code.
type BCHEncoder struct {
	code *BCHCode
	reg  []uint64
	out  []byte
}

// Name names the block in messages.
func (e *BCHEncoder) Name() string { return e.code.name + " encoder" }

// Err reports a bad code.
func (e *BCHEncoder) Err() error { return e.code.err }

// Rate is k/n.
func (e *BCHEncoder) Rate() float64 { return e.code.Rate() }

// Process encodes f.Coded.
func (e *BCHEncoder) Process(f *link.Frame, _ *rng.Stream) error {
	c := e.code
	if err := multiple(len(f.Coded), c.K, "bits"); err != nil {
		return err
	}
	words := len(f.Coded) / c.K
	e.reg = growUints(e.reg, c.words)
	e.out = link.GrowBytes(e.out, words*c.N)
	for w := 0; w < words; w++ {
		c.encode(f.Coded[w*c.K:(w+1)*c.K], e.out[w*c.N:(w+1)*c.N], e.reg)
	}
	f.Coded = e.out
	f.CodeRate *= c.Rate()
	return nil
}

// BCHDecoder is the hard-decision decoding block of a BCH code.
type BCHDecoder struct {
	code     *BCHCode
	s        *bchScratch
	cw, out  []byte
	words    int64
	detected int64
}

// Name names the block in messages.
func (d *BCHDecoder) Name() string { return d.code.name + " decoder" }

// Err reports a bad code.
func (d *BCHDecoder) Err() error { return d.code.err }

// Process decodes the hard decisions (or an inner decoder's output) to f.Out.
func (d *BCHDecoder) Process(f *link.Frame, _ *rng.Stream) error {
	c := d.code
	in := hardInput(f)
	if err := multiple(len(in), c.N, "decided bits"); err != nil {
		return err
	}
	if d.s == nil {
		d.s = c.scratch()
	}
	words := len(in) / c.N
	d.cw = link.GrowBytes(d.cw, c.N)
	d.out = link.GrowBytes(d.out, words*c.K)
	d.words, d.detected = int64(words), 0
	for w := 0; w < words; w++ {
		copy(d.cw, in[w*c.N:(w+1)*c.N])
		if c.decode(d.cw, d.s) < 0 {
			d.detected++
		}
		copy(d.out[w*c.K:(w+1)*c.K], d.cw[:c.K])
	}
	f.Out = d.out
	return nil
}

// Detected is a link counter (link.Link.Count): the codewords of the frame just decoded, and
// those found uncorrectable.
func (d *BCHDecoder) Detected(_ *link.Frame) (words, detected int64) {
	return d.words, d.detected
}
