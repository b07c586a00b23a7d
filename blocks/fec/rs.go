package fec

import (
	"fmt"

	"tally/blocks/link"
	"tally/blocks/rng"
)

// ReedSolomon is a Reed–Solomon code over GF(256) in the form of DVB-S (ETSI EN 300 421,
// §4.4.2, also DVB-C and DVB-T): field generator p(x) = x⁸ + x⁴ + x³ + x² + 1 and code
// generator g(x) = (x + λ⁰)(x + λ¹)…(x + λ^(n−k−1)), λ = 0x02. RS(204, 188), t = 8, is the
// code the standard uses, shortened from RS(255, 239) by 51 leading zero bytes that are not
// sent; other (n, k) with n ≤ 255 and n − k even are the same construction.
//
// Encoding is systematic: k message bytes, then n − k parity bytes, the remainder of
// m(x)·x^(n−k) by g(x); the first byte sent is the highest-degree coefficient. Bits map to
// bytes most significant bit first. The decoder computes the syndromes S_j = r(λ^j), finds the
// error locator by Berlekamp–Massey, its roots by Chien search and the error values by Forney's
// formula (Lin and Costello, Error Control Coding, 2nd ed., 2004, §7.4–7.5). It corrects any
// t = (n − k)/2 byte errors; a word it finds uncorrectable (locator of degree > t, or fewer
// roots among the sent positions than its degree) is passed on as received and counted by
// Detected. Beyond t errors it may also decode to a wrong codeword.
//
// Frames must hold a multiple of 8k bits (encoder) and of 8n bits (decoder).
type ReedSolomon struct {
	N, K int    // codeword and message length in bytes
	T    int    // correctable byte errors, (N − K)/2
	Gen  []byte // generator coefficients, Gen[i] of xⁱ, Gen[N−K] = 1

	gf   *field
	name string
	err  error
}

// RS is the Reed–Solomon code RS(n, k) of the DVB-S construction; RS(204, 188) is DVB-S's.
func RS(n, k int) *ReedSolomon {
	c := &ReedSolomon{N: n, K: k, gf: gfDVB, name: fmt.Sprintf("fec.RS(%d, %d)", n, k)}
	switch {
	case n < 2 || n > 255:
		c.err = fmt.Errorf("%s: n = %d must lie in 2…255 (bytes of GF(256))", c.name, n)
	case k < 1 || k >= n:
		c.err = fmt.Errorf("%s: k = %d must lie in 1…n−1", c.name, k)
	case (n-k)%2 != 0:
		c.err = fmt.Errorf("%s: n − k = %d must be even", c.name, n-k)
	}
	if c.err != nil {
		return c
	}
	c.T = (n - k) / 2
	// g(x) = Π (x + λ^i), built up one factor at a time.
	g := []byte{1}
	for i := 0; i < n-k; i++ {
		r := c.gf.pow(i)
		next := make([]byte, len(g)+1)
		for j, a := range g {
			next[j+1] ^= a
			next[j] ^= c.gf.mul(a, r)
		}
		g = next
	}
	c.Gen = g
	return c
}

// Err reports a bad (n, k).
func (c *ReedSolomon) Err() error { return c.err }

// Rate is k/n.
func (c *ReedSolomon) Rate() float64 { return float64(c.K) / float64(c.N) }

// Encode writes the n-byte codeword of the k-byte message msg to cw.
func (c *ReedSolomon) Encode(msg, cw []byte) {
	p := c.N - c.K
	copy(cw, msg[:c.K])
	par := cw[c.K:c.N]
	clear(par)
	for _, b := range msg[:c.K] {
		fb := b ^ par[0]
		if fb == 0 {
			copy(par, par[1:])
			par[p-1] = 0
			continue
		}
		lf := c.gf.log[fb]
		for j := 0; j < p-1; j++ {
			par[j] = par[j+1]
			if g := c.Gen[p-1-j]; g != 0 {
				par[j] ^= c.gf.exp[lf+c.gf.log[g]]
			}
		}
		par[p-1] = c.gf.exp[lf+c.gf.log[c.Gen[0]]]
	}
}

// Encoder is the block that encodes each 8k bits of f.Coded.
func (c *ReedSolomon) Encoder() *RSEncoder { return &RSEncoder{code: c} }

// Decoder is the block that decodes f.Hard (or an inner decoder's f.Out) to f.Out.
func (c *ReedSolomon) Decoder() *RSDecoder { return &RSDecoder{code: c} }

// RSEncoder is the encoding block of a Reed–Solomon code.
type RSEncoder struct {
	code    *ReedSolomon
	msg, cw []byte
	out     []byte
}

// Name names the block in messages.
func (e *RSEncoder) Name() string { return e.code.name + " encoder" }

// Err reports a bad code.
func (e *RSEncoder) Err() error { return e.code.err }

// Rate is k/n.
func (e *RSEncoder) Rate() float64 { return e.code.Rate() }

// Process encodes f.Coded.
func (e *RSEncoder) Process(f *link.Frame, _ *rng.Stream) error {
	c := e.code
	if err := multiple(len(f.Coded), 8*c.K, "bits"); err != nil {
		return err
	}
	words := len(f.Coded) / (8 * c.K)
	e.msg = link.GrowBytes(e.msg, c.K)
	e.cw = link.GrowBytes(e.cw, c.N)
	e.out = link.GrowBytes(e.out, words*8*c.N)
	for w := 0; w < words; w++ {
		packBytes(e.msg, f.Coded[w*8*c.K:(w+1)*8*c.K])
		c.Encode(e.msg, e.cw)
		unpackBytes(e.out[w*8*c.N:(w+1)*8*c.N], e.cw)
	}
	f.Coded = e.out
	f.CodeRate *= c.Rate()
	return nil
}

// RSDecoder is the hard-decision decoding block of a Reed–Solomon code.
type RSDecoder struct {
	code     *ReedSolomon
	cw       []byte
	out      []byte
	words    int64
	detected int64
	s        rsScratch
}

// Name names the block in messages.
func (d *RSDecoder) Name() string { return d.code.name + " decoder" }

// Err reports a bad code.
func (d *RSDecoder) Err() error { return d.code.err }

// Process decodes the hard decisions to f.Out.
func (d *RSDecoder) Process(f *link.Frame, _ *rng.Stream) error {
	c := d.code
	in := hardInput(f)
	if err := multiple(len(in), 8*c.N, "decided bits"); err != nil {
		return err
	}
	words := len(in) / (8 * c.N)
	d.cw = link.GrowBytes(d.cw, c.N)
	d.out = link.GrowBytes(d.out, words*8*c.K)
	d.words, d.detected = int64(words), 0
	for w := 0; w < words; w++ {
		packBytes(d.cw, in[w*8*c.N:(w+1)*8*c.N])
		if c.decode(d.cw, &d.s) < 0 {
			d.detected++
		}
		unpackBytes(d.out[w*8*c.K:(w+1)*8*c.K], d.cw[:c.K])
	}
	f.Out = d.out
	return nil
}

// Detected is a link counter (link.Link.Count): the codewords of the frame just decoded, and
// those found uncorrectable.
func (d *RSDecoder) Detected(_ *link.Frame) (words, detected int64) {
	return d.words, d.detected
}

// rsScratch holds a decoder's working polynomials, so decoding allocates nothing.
type rsScratch struct {
	syn, lambda, prev, tmp, omega [256]byte
}

// Decode corrects the n-byte word cw in place. It returns the number of byte errors corrected,
// or −1 when it finds the word uncorrectable (cw is then left as received).
func (c *ReedSolomon) Decode(cw []byte) int {
	var s rsScratch
	return c.decode(cw, &s)
}

func (c *ReedSolomon) decode(cw []byte, s *rsScratch) int {
	gf := c.gf
	p := c.N - c.K
	cw = cw[:c.N]
	// Syndromes S_j = r(λ^j) by Horner's rule, highest degree first.
	zero := true
	for j := 0; j < p; j++ {
		var v byte
		if j == 0 {
			for _, b := range cw {
				v ^= b
			}
		} else {
			for _, b := range cw {
				if v != 0 {
					v = gf.exp[gf.log[v]+j]
				}
				v ^= b
			}
		}
		s.syn[j] = v
		if v != 0 {
			zero = false
		}
	}
	if zero {
		return 0
	}
	// Berlekamp–Massey: the shortest LFSR Λ(x) generating S_0 … S_(p−1).
	lam, prev := s.lambda[:p+1], s.prev[:p+1]
	clear(lam)
	clear(prev)
	lam[0], prev[0] = 1, 1
	L, m, b := 0, 1, byte(1)
	for n := 0; n < p; n++ {
		d := s.syn[n]
		for i := 1; i <= L; i++ {
			d ^= gf.mul(lam[i], s.syn[n-i])
		}
		if d == 0 {
			m++
			continue
		}
		coef := gf.div(d, b)
		if 2*L <= n {
			copy(s.tmp[:p+1], lam)
			for i := 0; i+m <= p; i++ {
				lam[i+m] ^= gf.mul(coef, prev[i])
			}
			L = n + 1 - L
			copy(prev, s.tmp[:p+1])
			b, m = d, 1
		} else {
			for i := 0; i+m <= p; i++ {
				lam[i+m] ^= gf.mul(coef, prev[i])
			}
			m++
		}
	}
	if L > c.T {
		return -1
	}
	// Ω(x) = S(x)Λ(x) mod x^p.
	om := s.omega[:p]
	clear(om)
	for i := 0; i <= L; i++ {
		if lam[i] == 0 {
			continue
		}
		for j := 0; i+j < p; j++ {
			om[i+j] ^= gf.mul(lam[i], s.syn[j])
		}
	}
	// Chien search over the sent positions: degree i holds an error when Λ(λ^−i) = 0. The
	// error values are Forney's Y = X^(1−b)·Ω(X⁻¹)/Λ'(X⁻¹) with X = λ^i and b = 0, the first
	// root of g. Errors are found before any is corrected, so a failure leaves cw as received.
	var found int
	var pos [128]int
	var val [128]byte
	for i := 0; i < c.N; i++ {
		xinv := gf.pow(-i)
		var v, dv, w byte
		xp := byte(1) // xinv^j
		for j := 0; j <= L; j++ {
			if lam[j] != 0 {
				t := gf.mul(lam[j], xp)
				v ^= t
				if j&1 == 1 { // formal derivative in characteristic 2: odd terms, one degree down
					dv ^= gf.div(t, xinv)
				}
			}
			xp = gf.mul(xp, xinv)
		}
		if v != 0 {
			continue
		}
		if found == L || dv == 0 {
			return -1
		}
		xp = 1
		for j := 0; j < p; j++ {
			w ^= gf.mul(om[j], xp)
			xp = gf.mul(xp, xinv)
		}
		pos[found] = c.N - 1 - i
		val[found] = gf.mul(gf.pow(i), gf.div(w, dv))
		found++
	}
	if found != L {
		return -1
	}
	for e := 0; e < found; e++ {
		cw[pos[e]] ^= val[e]
	}
	return found
}

// packBytes packs bits (one per byte, most significant first) into bytes.
func packBytes(dst, bits []byte) {
	for i := range dst {
		b := bits[8*i : 8*i+8 : 8*i+8]
		dst[i] = b[0]<<7 | b[1]<<6 | b[2]<<5 | b[3]<<4 | b[4]<<3 | b[5]<<2 | b[6]<<1 | b[7]&1
	}
}

// unpackBytes spreads bytes into bits, most significant first.
func unpackBytes(bits, src []byte) {
	for i, v := range src {
		b := bits[8*i : 8*i+8 : 8*i+8]
		for j := range b {
			b[j] = v >> (7 - j) & 1
		}
	}
}

// Nature declares the decoder to the estimators, which refuse it after the noise.
func (d *RSDecoder) Nature() link.Kind { return link.Decoder }
