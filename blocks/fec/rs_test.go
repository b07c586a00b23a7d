package fec_test

import (
	"testing"

	"gonum.org/v1/gonum/stat/distuv"

	"tally/blocks/fec"
	"tally/blocks/internal/linktest"
	"tally/blocks/link"
	"tally/blocks/rng"
	"tally/blocks/stats"
)

// gfMul multiplies in GF(256) with p(x) = x⁸ + x⁴ + x³ + x² + 1 (ETSI EN 300 421 §4.4.2) by
// shift and add, independently of the package's log tables.
func gfMul(a, b byte) byte {
	var p byte
	for b != 0 {
		if b&1 != 0 {
			p ^= a
		}
		hi := a & 0x80
		a <<= 1
		if hi != 0 {
			a ^= 0x1d
		}
		b >>= 1
	}
	return p
}

// eval is c(x) at x for coefficients highest degree first (the order bytes are sent).
func eval(c []byte, x byte) byte {
	var v byte
	for _, b := range c {
		v = gfMul(v, x) ^ b
	}
	return v
}

func gfPow(i int) byte {
	v := byte(1)
	for ; i > 0; i-- {
		v = gfMul(v, 2)
	}
	return v
}

func TestRSGeneratorAndCodewords(t *testing.T) {
	// ETSI EN 300 421 §4.4.2: g(x) = (x+λ⁰)(x+λ¹)…(x+λ¹⁵), λ = 0x02, so g is monic of degree 16
	// with those roots, and every codeword (a multiple of g) vanishes there too. RS codes are
	// maximum distance separable (Lin and Costello §7.2): d = n − k + 1 = 17, so a message of one
	// nonzero byte has a codeword of weight ≥ 17 (all 188·255 such messages).
	c := fec.RS(204, 188)
	if err := c.Err(); err != nil {
		t.Fatal(err)
	}
	g := c.Gen
	if len(g) != 17 || g[16] != 1 {
		t.Fatalf("generator of degree %d, leading %d", len(g)-1, g[len(g)-1])
	}
	rev := make([]byte, len(g))
	for i := range g {
		rev[i] = g[len(g)-1-i]
	}
	for i := 0; i < 16; i++ {
		if eval(rev, gfPow(i)) != 0 {
			t.Errorf("g(λ^%d) ≠ 0", i)
		}
	}
	if eval(rev, gfPow(16)) == 0 {
		t.Error("g(λ^16) = 0")
	}
	msg := make([]byte, 188)
	cw := make([]byte, 204)
	r := rng.New(5)
	for trial := 0; trial < 20; trial++ {
		for i := range msg {
			msg[i] = byte(r.Uint64())
		}
		c.Encode(msg, cw)
		if string(cw[:188]) != string(msg) {
			t.Fatal("not systematic")
		}
		for i := 0; i < 16; i++ {
			if eval(cw, gfPow(i)) != 0 {
				t.Fatalf("codeword(λ^%d) ≠ 0", i)
			}
		}
	}
	clear(msg)
	for pos := 0; pos < 188; pos++ {
		for v := 1; v < 256; v++ {
			msg[pos] = byte(v)
			c.Encode(msg, cw)
			w := 0
			for _, b := range cw {
				if b != 0 {
					w++
				}
			}
			if w < 17 {
				t.Fatalf("message byte %d = %d: codeword weight %d < 17", pos, v, w)
			}
		}
		msg[pos] = 0
	}
}

// corrupt puts e byte errors (distinct positions, nonzero values) into cw.
func corrupt(r *rng.Stream, cw []byte, e int) {
	perm := r.Rand().Perm(len(cw))
	for _, p := range perm[:e] {
		cw[p] ^= byte(1 + r.IntN(255))
	}
}

func TestRSCorrectsUpToT(t *testing.T) {
	// Bounded-distance decoding corrects every pattern of up to t = (n − k)/2 byte errors
	// (Lin and Costello §7.4); random patterns for each weight, on DVB-S's RS(204, 188) and two
	// other members of the family.
	r := rng.New(9)
	for _, nk := range [][2]int{{204, 188}, {255, 223}, {15, 11}} {
		c := fec.RS(nk[0], nk[1])
		msg, cw, rx := make([]byte, c.K), make([]byte, c.N), make([]byte, c.N)
		for e := 0; e <= c.T; e++ {
			for trial := 0; trial < 200; trial++ {
				for i := range msg {
					msg[i] = byte(r.Uint64())
				}
				c.Encode(msg, cw)
				copy(rx, cw)
				corrupt(r, rx, e)
				if got := c.Decode(rx); got != e || string(rx) != string(cw) {
					t.Fatalf("RS(%d, %d), %d errors: decoder says %d, codeword restored %v", c.N, c.K, e, got, string(rx) == string(cw))
				}
			}
		}
	}
}

func TestRSBeyondT(t *testing.T) {
	// With t < e ≤ 2t errors a bounded-distance decoder fails: it reports the word uncorrectable,
	// or (rarely: probability below 1/t! ≈ 2.5e-5 for t = 8, McEliece and Swanson, IEEE Trans.
	// Inf. Theory, 1986, from memory) decodes to another codeword within distance t of the
	// received word. Never to the sent one.
	c := fec.RS(204, 188)
	r := rng.New(10)
	msg, cw, rx, orig := make([]byte, 188), make([]byte, 204), make([]byte, 204), make([]byte, 204)
	detected, total := 0, 0
	for e := c.T + 1; e <= 2*c.T; e++ {
		for trial := 0; trial < 200; trial++ {
			for i := range msg {
				msg[i] = byte(r.Uint64())
			}
			c.Encode(msg, cw)
			copy(rx, cw)
			corrupt(r, rx, e)
			copy(orig, rx)
			got := c.Decode(rx)
			total++
			if got < 0 {
				detected++
				if string(rx) != string(orig) {
					t.Fatal("a failed word was changed")
				}
				continue
			}
			if string(rx) == string(cw) {
				t.Fatalf("%d errors decoded to the sent codeword", e)
			}
			diff := 0
			for i := range rx {
				if rx[i] != orig[i] {
					diff++
				}
			}
			for i := 0; i < 16; i++ {
				if eval(rx, gfPow(i)) != 0 || diff > c.T || diff != got {
					t.Fatalf("%d errors: miscorrection to a non-codeword or beyond t (%d changes, %d reported)", e, diff, got)
				}
			}
		}
	}
	if detected < total-2 {
		t.Errorf("%d of %d words beyond t detected", detected, total)
	}
}

func TestRSWordErrorRateOnBSC(t *testing.T) {
	// On a BSC with bit error p a byte is wrong with probability ps = 1 − (1 − p)⁸ independently,
	// so a word fails exactly when more than t of its n bytes are wrong: a binomial tail
	// (gonum distuv.Binomial). Words are independent trials: 99 % Clopper–Pearson interval.
	const p = 0.003
	c := fec.RS(204, 188)
	dec := c.Decoder()
	l := link.Chain(&linktest.Source{N: 188 * 8 * 10}, c.Encoder(), &bsc{p: p}, dec).Count("words", func(f *link.Frame) (int64, int64) {
		var n, e int64
		for w := 0; w < len(f.Bits)/(8*188); w++ {
			n++
			if string(f.Bits[w*8*188:(w+1)*8*188]) != string(f.Out[w*8*188:(w+1)*8*188]) {
				e++
			}
		}
		return n, e
	}).Count("detected", dec.Detected)
	got := run(t, l, 300, 4)
	ps := 1 - pow8(1-p)
	want := distuv.Binomial{N: 204, P: ps}.Survival(8)
	w := got["words"]
	e, _ := stats.ClopperPearson(w.Errors, w.Trials, 0.99)
	if !(e.Low <= want && want <= e.High) {
		t.Errorf("word error rate %.4g [%.4g, %.4g] excludes the binomial tail %.4g", e.Rate, e.Low, e.High, want)
	}
	if d := got["detected"]; d.Errors > w.Errors || d.Errors < w.Errors-2 {
		t.Errorf("%d failures detected of %d wrong words", d.Errors, w.Errors)
	}
	t.Logf("word errors %.4g (%d of %d), theory %.4g, pre-FEC %.4g", e.Rate, w.Errors, w.Trials, want,
		float64(got[link.TapPre].Errors)/float64(got[link.TapPre].Trials))
}

func pow8(x float64) float64 { x *= x; x *= x; return x * x }

func TestRSBadParameters(t *testing.T) {
	for _, nk := range [][2]int{{256, 240}, {204, 189}, {10, 10}, {10, 0}} {
		if fec.RS(nk[0], nk[1]).Err() == nil {
			t.Errorf("RS(%d, %d): no error", nk[0], nk[1])
		}
	}
	if err := fec.RS(204, 189).Err(); err.Error() != "fec.RS(204, 189): n − k = 15 must be even" {
		t.Errorf("message %q", err)
	}
	l := link.Chain(&linktest.Source{N: 1000}, fec.RS(204, 188).Encoder())
	if err := l.Check(); err != nil {
		t.Fatal(err)
	}
	var f link.Frame
	if err := l.Run(&f, 1, 0, 0, make([]link.Tally, 3)); err == nil {
		t.Error("a frame of 1000 bits was accepted by RS(204, 188)")
	}
}
