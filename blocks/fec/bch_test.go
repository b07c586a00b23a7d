package fec_test

import (
	"fmt"
	"math/bits"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/stat/combin"

	"tally/blocks/fec"
	"tally/blocks/link"
	"tally/blocks/rng"
)

func TestBCHGenerators(t *testing.T) {
	// Generator polynomials in octal, highest degree first, from Lin and Costello, Error Control
	// Coding, 2nd ed., 2004, Table C.1 (BCH codes of length up to 2^10 − 1; from memory for the
	// digits): (15,11) 23, (15,7) 721, (15,5) 2467, (31,21) 3551, (63,57) 103, (255,247) 435.
	cases := []struct {
		n, k, t int
		octal   uint64
	}{
		{15, 11, 1, 0o23}, {15, 7, 2, 0o721}, {15, 5, 3, 0o2467}, {31, 21, 2, 0o3551},
		{63, 57, 1, 0o103}, {255, 247, 1, 0o435},
	}
	for _, c := range cases {
		code := fec.BCH(c.n, c.k)
		if err := code.Err(); err != nil {
			t.Fatal(err)
		}
		var g uint64
		for i, b := range code.Gen {
			g |= uint64(b) << i
		}
		if g != c.octal || code.T != c.t {
			t.Errorf("BCH(%d, %d): g = %o (octal), t = %d; want %o, t = %d", c.n, c.k, g, code.T, c.octal, c.t)
		}
	}
}

// bchWord packs an n-bit word (bit i of the word is position i).
func bchWord(v []byte) uint32 {
	var w uint32
	for i, b := range v {
		w |= uint32(b) << i
	}
	return w
}

func TestBCH157WeightsAndBoundedDistance(t *testing.T) {
	// Exhaustive on BCH(15, 7), t = 2. Its weight enumerator is
	// 1 + 18z⁵ + 30z⁶ + 15z⁷ + 15z⁸ + 30z⁹ + 18z¹⁰ + z¹⁵ (from memory; it is the dual of the
	// (15, 8) code's and has d = 5, Lin and Costello 2004, §6.1).
	const n, k, tc = 15, 7, 2
	code := fec.BCH(n, k)
	msg, cw := make([]byte, k), make([]byte, n)
	weights := make([]float64, n+1)
	codewords := map[uint32]bool{}
	for u := 0; u < 1<<k; u++ {
		for i := range msg {
			msg[i] = byte(u >> i & 1)
		}
		code.Encode(msg, cw)
		weights[bits.OnesCount32(bchWord(cw))]++
		codewords[bchWord(cw)] = true
	}
	want := []float64{1, 0, 0, 0, 0, 18, 30, 15, 15, 30, 18, 0, 0, 0, 0, 1}
	if !slices.Equal(weights, want) {
		t.Fatalf("weight distribution %v, want %v", weights, want)
	}
	// Bounded-distance decoding: a pattern e of weight w is corrected when w ≤ t, decoded to the
	// wrong codeword c when d(e, c) ≤ t, and detected otherwise. The number of weight-w words
	// at distance s from a word of weight j is C(j, i)·C(n − j, s − i) with i = (j − w + s)/2
	// ones removed (a counting fact; Lin and Costello 2004, §3.4, the same count for the
	// probability of undetected decoding error). Every error pattern is tried on a nonzero
	// codeword.
	miscorrect := make([]int, n+1)
	for w := 0; w <= n; w++ {
		for j, a := range want {
			if a == 0 || j == 0 {
				continue
			}
			for s := 0; s <= tc; s++ {
				if (j-w+s)%2 != 0 {
					continue
				}
				i := (j - w + s) / 2
				if i < 0 || i > j || s-i < 0 || s-i > n-j {
					continue
				}
				miscorrect[w] += int(a) * combin.Binomial(j, i) * combin.Binomial(n-j, s-i)
			}
		}
	}
	for i := range msg {
		msg[i] = byte(i % 2)
	}
	code.Encode(msg, cw)
	sent := slices.Clone(cw)
	gotCorrect, gotWrong, gotDetect := make([]int, n+1), make([]int, n+1), make([]int, n+1)
	r := make([]byte, n)
	for e := 0; e < 1<<n; e++ {
		w := bits.OnesCount32(uint32(e))
		for i := range r {
			r[i] = sent[i] ^ byte(e>>i&1)
		}
		got := code.Decode(r)
		switch {
		case got < 0:
			if !slices.Equal(r, func() []byte {
				x := slices.Clone(sent)
				for i := range x {
					x[i] ^= byte(e >> i & 1)
				}
				return x
			}()) {
				t.Fatalf("pattern %015b: detected but the word was changed", e)
			}
			gotDetect[w]++
		case slices.Equal(r, sent):
			gotCorrect[w]++
		default:
			if !codewords[bchWord(r)] {
				t.Fatalf("pattern %015b: decoded to %v, not a codeword", e, r)
			}
			gotWrong[w]++
		}
	}
	for w := 0; w <= n; w++ {
		all := combin.Binomial(n, w)
		switch {
		case w <= tc && gotCorrect[w] != all:
			t.Errorf("weight %d: %d of %d corrected", w, gotCorrect[w], all)
		case w > tc && (gotWrong[w] != miscorrect[w] || gotDetect[w] != all-miscorrect[w] || gotCorrect[w] != 0):
			t.Errorf("weight %d: %d wrong, %d detected, %d corrected; bounded distance predicts %d wrong, %d detected",
				w, gotWrong[w], gotDetect[w], gotCorrect[w], miscorrect[w], all-miscorrect[w])
		}
	}
}

func TestBCHCorrectsUpToT(t *testing.T) {
	// Every pattern of up to t errors is corrected (the BCH bound, Lin and Costello 2004,
	// Theorem 6.1): exhaustive for BCH(31, 21), random patterns for longer and shortened codes.
	code := fec.BCH(31, 21)
	msg, cw := make([]byte, 21), make([]byte, 31)
	r := rng.New(5)
	r.Bits(msg)
	code.Encode(msg, cw)
	for a := -1; a < 31; a++ {
		for b := a + 1; b < 31; b++ {
			x := slices.Clone(cw)
			if a >= 0 {
				x[a] ^= 1
			}
			x[b] ^= 1
			if got := code.Decode(x); !slices.Equal(x, cw) || got != min(a+1, 1)+1 {
				t.Fatalf("errors at %d, %d: returned %d, word corrected: %v", a, b, got, slices.Equal(x, cw))
			}
		}
	}
	for _, nk := range [][2]int{{255, 239}, {1023, 993}, {200, 184}, {16200, 16032}} {
		code := fec.BCH(nk[0], nk[1])
		if err := code.Err(); err != nil {
			t.Fatal(err)
		}
		msg, cw := make([]byte, code.K), make([]byte, code.N)
		for trial := 0; trial < 50; trial++ {
			r.Bits(msg)
			code.Encode(msg, cw)
			x := slices.Clone(cw)
			w := 1 + trial%code.T
			for flipped := 0; flipped < w; {
				if p := r.IntN(code.N); x[p] == cw[p] {
					x[p] ^= 1
					flipped++
				}
			}
			if got := code.Decode(x); got != w || !slices.Equal(x, cw) {
				t.Fatalf("BCH(%d, %d), %d errors: returned %d", code.N, code.K, w, got)
			}
		}
	}
}

func TestBCHBlocks(t *testing.T) {
	// Through the link: a wire that flips two bits of each 31-bit word leaves no error after
	// the decoder; BSC at p = 0.01 lowers the BER (common practice, no source).
	code := fec.BCH(31, 21)
	var at []int
	for w := 0; w < 10; w++ {
		at = append(at, 31*w+3, 31*w+30)
	}
	dec := code.Decoder()
	l := link.Chain(srcBits(210), code.Encoder(), &flips{at: at}, dec)
	got := run(t, l.Count("detected", dec.Detected), 3, 1)
	if got[link.TapBER].Errors != 0 || got[link.TapPre].Errors != 60 || got["detected"].Trials != 30 {
		t.Errorf("two errors per word: %+v", got)
	}
	got = run(t, link.Chain(srcBits(21*40), code.Encoder(), &bsc{p: 0.01}, code.Decoder()), 50, 2)
	if b, p := got[link.TapBER], got[link.TapPre]; b.Errors*p.Trials*5 > p.Errors*b.Trials {
		t.Errorf("decoded BER %d/%d not well below pre-FEC %d/%d", b.Errors, b.Trials, p.Errors, p.Trials)
	}
	// Bad parameters and lengths.
	if err := fec.BCH(31, 20).Err(); err == nil || !strings.Contains(err.Error(), "fec.BCH(31, 20)") {
		t.Errorf("BCH(31, 20): %v", err)
	}
	if err := link.Chain(srcBits(20), code.Encoder()).Check(); err != nil {
		t.Fatal(err)
	}
	var f link.Frame
	if err := link.Chain(srcBits(20), code.Encoder()).Run(&f, 1, 0, 0, make([]link.Tally, 3)); err == nil ||
		!strings.Contains(err.Error(), "multiple of 21") {
		t.Errorf("20 bits: %v", err)
	}
}

func TestBCHNoAllocation(t *testing.T) {
	code := fec.BCH(255, 239)
	l := link.Chain(srcBits(239*8), code.Encoder(), &bsc{p: 0.005}, code.Decoder())
	noAllocs(t, l)
}

func noAllocs(t *testing.T, l *link.Link) {
	t.Helper()
	counts := make([]link.Tally, len(l.Taps()))
	var f link.Frame
	i := 0
	step := func() {
		if err := l.Run(&f, 1, 0, i, counts); err != nil {
			t.Fatal(err)
		}
		i++
	}
	step()
	step()
	if a := testing.AllocsPerRun(20, step); a != 0 {
		t.Errorf("%v allocations per frame", a)
	}
}

func BenchmarkBCHDecode(b *testing.B) {
	// BCH(255, 239) at pre-decoding BER 1e-3 (a few words with errors per frame) and 1e-5.
	for _, p := range []float64{1e-3, 1e-5} {
		b.Run(fmt.Sprintf("p=%g", p), func(b *testing.B) {
			code := fec.BCH(255, 239)
			l := link.Chain(srcBits(239*32), code.Encoder(), &bsc{p: p}, code.Decoder())
			benchLink(b, l, 239*32)
		})
	}
}
