package source_test

import (
	"bytes"
	"strings"
	"testing"

	"tally/blocks/link"
	"tally/blocks/rng"
	"tally/blocks/source"
)

// frame runs block b on frame index of point 0 and returns a copy of its bits.
func frame(t *testing.T, b link.Block, index int) []byte {
	t.Helper()
	f := &link.Frame{Index: index}
	if err := b.Process(f, rng.New(uint64(index))); err != nil {
		t.Fatal(err)
	}
	if &f.Bits[0] != &f.Coded[0] {
		t.Fatal("Coded is not the same slice as Bits")
	}
	return append([]byte(nil), f.Bits...)
}

// stepPRBS is the sequence of the O.150 polynomial x^n + x^k + 1 from its recurrence,
// a[t] = a[t−k] ⊕ a[t−n], started from all ones, written plainly with a slice (from memory of
// the standard's shift register: stages k and n XORed into stage 1).
func stepPRBS(n, k, length int) []byte {
	a := make([]byte, length+n)
	for i := range n {
		a[i] = 1
	}
	for t := n; t < len(a); t++ {
		a[t] = a[t-k] ^ a[t-n]
	}
	return a[:length]
}

// O.150 polynomials x^n + x^k + 1 (ITU-T Recommendation O.150, from memory).
var o150 = map[int]int{7: 6, 9: 5, 11: 9, 15: 14, 20: 3, 23: 18, 29: 27, 31: 28}

func TestPRBSFollowsTheStandardRecurrence(t *testing.T) {
	for n, k := range o150 {
		const N = 1000
		s := source.PRBS(n, N).Invert(false)
		want := stepPRBS(n, k, 3*N)
		var got []byte
		for f := range 3 {
			got = append(got, frame(t, s, f)...)
		}
		if !bytes.Equal(got, want) {
			t.Errorf("order %d: frames 0–2 differ from the recurrence of x^%d + x^%d + 1", n, n, k)
		}
	}
}

func TestPRBS7KnownBytes(t *testing.T) {
	// The first 16 bytes (bits most significant first) of the x^7 + x^6 + 1 sequence from an
	// all-ones register, as commonly listed for PRBS7 test patterns (from memory).
	want := []byte{0xFE, 0x04, 0x18, 0x51, 0xE4, 0x59, 0xD4, 0xFA, 0x1C, 0x49, 0xB5, 0xBD, 0x8D, 0x2E, 0xE6, 0x55}
	a := frame(t, source.PRBS(7, 128), 0)
	for i, w := range want {
		var b byte
		for _, x := range a[8*i : 8*i+8] {
			b = b<<1 | x
		}
		if b != w {
			t.Errorf("byte %d = %02X, want %02X", i, b, w)
		}
	}
}

func TestPRBSPeriodAndBalance(t *testing.T) {
	// A maximal-length sequence of an n-stage register has period 2^n − 1 and 2^(n−1) ones
	// per period (Golomb, Shift Register Sequences, 1967, the balance property). Walk the full
	// period for orders up to 23 (the 8 M steps of order 23 take some milliseconds), in frames
	// of at most 2^20 bits (a frame may not exceed 2^22), which the sequence runs on across.
	for _, n := range []int{7, 9, 11, 15, 20, 23} {
		P := 1<<n - 1
		N := min(P+n, 1<<20)
		s := source.PRBS(n, N).Invert(false)
		var a []byte
		for f := 0; len(a) < P+n; f++ {
			a = append(a, frame(t, s, f)...)
		}
		for i := range n { // the register returns to its start after P steps, not before
			if a[P+i] != a[i] {
				t.Fatalf("order %d: bit %d of the second period differs", n, i)
			}
		}
		ones := bytes.Count(a[:P], []byte{1})
		if ones != 1<<(n-1) {
			t.Errorf("order %d: %d ones in a period, want 2^%d", n, ones, n-1)
		}
		// No shorter period: the first n-bit window recurs only at offset P.
		w := a[:n]
		if i := bytes.Index(a[1:P+n-1], w); i+1 != P && i != -1 {
			t.Errorf("order %d: start window recurs at offset %d < %d", n, i+1, P)
		}
	}
}

func TestPRBSJumpMatchesStepping(t *testing.T) {
	// Frames far into the sequence come from jumping; they must equal what stepping gives.
	// Orders 29 and 31 are too long to walk (their period is checked in prbs_period_test.go),
	// so check frames at offsets up to a few million bits.
	for _, n := range []int{23, 29, 31} {
		k := o150[n]
		const N = 4093
		want := stepPRBS(n, k, 2100*N)
		s := source.PRBS(n, N).Invert(false)
		for _, f := range []int{1, 17, 555, 2099} {
			if got := frame(t, s, f); !bytes.Equal(got, want[f*N:(f+1)*N]) {
				t.Errorf("order %d: frame %d differs from stepping", n, f)
			}
		}
	}
	// Wrap-around: order 23 frame f = P (period) starts at P·N mod P = 0, frame P+1 at N.
	s := source.PRBS(23, 100).Invert(false)
	P := 1<<23 - 1
	if !bytes.Equal(frame(t, s, P), frame(t, s, 0)) || !bytes.Equal(frame(t, s, P+1), frame(t, s, 1)) {
		t.Error("order 23: frames one period apart differ")
	}
}

func TestPRBSContinuityAndInversion(t *testing.T) {
	// Frame continuity across the wrap of a short sequence: order 7 (period 127), 50 bits per
	// frame, frames 0–9 concatenated are the sequence read on and on.
	s := source.PRBS(7, 50).Invert(false)
	base := stepPRBS(7, 6, 127)
	var got []byte
	for f := range 10 {
		got = append(got, frame(t, s, f)...)
	}
	for i, b := range got {
		if b != base[i%127] {
			t.Fatalf("bit %d = %d, sequence bit %d = %d", i, b, i%127, base[i%127])
		}
	}
	// O.150 inverts the 2^15−1, 2^23−1, 2^29−1 and 2^31−1 sequences (from memory), not the
	// shorter ones.
	for n := range o150 {
		want := n >= 15 && n != 20
		if got := source.PRBS(n, 8).Inverted; got != want {
			t.Errorf("order %d: Inverted = %v, want %v", n, got, want)
		}
	}
	a := frame(t, source.PRBS(15, 64), 3)
	b := frame(t, source.PRBS(15, 64).Invert(false), 3)
	for i := range a {
		if a[i] != 1-b[i] {
			t.Fatal("the inverted sequence is not the complement")
		}
	}
}

func TestRandomBits(t *testing.T) {
	s := source.Random(100000)
	a, b := frame(t, s, 1), frame(t, s, 2)
	// Equiprobable bits: 99.99 % of frames of 1e5 fair bits have between 48 800 and 51 200 ones
	// (binomial, ±3.8σ; common practice, no source).
	for _, x := range [][]byte{a, b} {
		if ones := bytes.Count(x, []byte{1}); ones < 48800 || ones > 51200 {
			t.Errorf("%d ones in 100000 bits", ones)
		}
		if bytes.Count(x, []byte{0})+bytes.Count(x, []byte{1}) != len(x) {
			t.Error("a bit is neither 0 nor 1")
		}
	}
	if bytes.Equal(a, b) {
		t.Error("two frames carry the same bits")
	}
	if !bytes.Equal(a, frame(t, s, 1)) {
		t.Error("the same frame's stream gave other bits")
	}
}

func TestPatternRunsOn(t *testing.T) {
	p := []byte{1, 1, 0, 1, 0}
	s := source.Pattern(p, 7)
	for f := range 6 {
		got := frame(t, s, f)
		for i, b := range got {
			if want := p[(f*7+i)%5]; b != want {
				t.Fatalf("frame %d bit %d = %d, want %d", f, i, b, want)
			}
		}
	}
}

func TestBadParameters(t *testing.T) {
	cases := []struct {
		b    link.Checked
		want string
	}{
		{source.Random(0), "source.Random: n = 0"},
		{source.PRBS(8, 100), "source.PRBS: order 8"},
		{source.PRBS(7, -1), "source.PRBS: n = -1"},
		{source.Pattern(nil, 10), "source.Pattern: the pattern is empty"},
		{source.Pattern([]byte{0, 2}, 10), "source.Pattern: bit 1 of the pattern is 2"},
	}
	for _, c := range cases {
		err := c.b.Err()
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("error %v, want one containing %q", err, c.want)
		}
	}
}

func TestNoAllocationPerFrame(t *testing.T) {
	for _, b := range []link.Block{source.Random(4096), source.PRBS(31, 4096), source.Pattern([]byte{1, 0, 0}, 4096)} {
		f := &link.Frame{}
		r := rng.New(1)
		_ = b.Process(f, r)
		i := 0
		if n := testing.AllocsPerRun(20, func() { i++; f.Index = i; _ = b.Process(f, r) }); n != 0 {
			t.Errorf("%s: %v allocations per frame", link.NameOf(b), n)
		}
	}
}
