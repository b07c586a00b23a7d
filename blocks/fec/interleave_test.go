package fec_test

import (
	"testing"

	"tally/blocks/fec"
	"tally/blocks/internal/linktest"
	"tally/blocks/link"
	"tally/blocks/rng"
)

// interleave runs an interleaving block on bits and returns its output.
func interleave(t *testing.T, b link.Block, bits []byte, index int) []byte {
	t.Helper()
	f := &link.Frame{Index: index, Bits: bits, Coded: bits, CodeRate: 1}
	if err := b.Process(f, rng.New(uint64(index))); err != nil {
		t.Fatal(err)
	}
	return append([]byte(nil), f.Coded...)
}

func TestBlockInterleaverOrder(t *testing.T) {
	// Write rows, read columns (common practice, no source): a 2 × 3 array 0 1 2 / 3 4 5 is read
	// 0 3 1 4 2 5; two arrays in one frame are permuted one after the other.
	il := fec.BlockInterleaver(2, 3)
	in := []byte{0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11}
	got := interleave(t, il.Interleave(), in, 0)
	want := []byte{0, 3, 1, 4, 2, 5, 6, 9, 7, 10, 8, 11}
	if string(got) != string(want) {
		t.Errorf("read out %v, want %v", got, want)
	}
	// Units of two bits move together.
	got = interleave(t, fec.BlockInterleaver(2, 3).Group(2).Interleave(), in, 0)
	want = []byte{0, 1, 6, 7, 2, 3, 8, 9, 4, 5, 10, 11}
	if string(got) != string(want) {
		t.Errorf("grouped read out %v, want %v", got, want)
	}
	if fec.BlockInterleaver(0, 3).Err() == nil || fec.RandomInterleaver().Group(0).Err() == nil {
		t.Error("0 rows accepted")
	}
	f := &link.Frame{Coded: make([]byte, 7)}
	if err := il.Interleave().Process(f, nil); err == nil {
		t.Error("a frame of 7 bits accepted by a 2 × 3 interleaver")
	}
}

func TestRandomInterleaverIsAPermutationPerFrame(t *testing.T) {
	il := fec.RandomInterleaver()
	b := il.Interleave()
	in := make([]byte, 200)
	for i := range in {
		in[i] = byte(i)
	}
	a0 := interleave(t, b, in, 0)
	a1 := interleave(t, b, in, 1)
	again := interleave(t, b, in, 0)
	seen := make([]bool, len(in))
	for _, x := range a0 {
		if seen[x] {
			t.Fatalf("%d appears twice", x)
		}
		seen[x] = true
	}
	if string(a0) == string(a1) {
		t.Error("two frames got the same permutation")
	}
	if string(a0) != string(again) {
		t.Error("the same stream gave another permutation")
	}
	if string(a0) == string(in) {
		t.Error("identity permutation")
	}
	// Bytes stay whole.
	g := interleave(t, fec.RandomInterleaver().Group(8).Interleave(), in, 3)
	for u := 0; u < len(g); u += 8 {
		if g[u]%8 != 0 {
			t.Fatalf("unit at %d starts with bit %d", u, g[u])
		}
		for k := 1; k < 8; k++ {
			if g[u+k] != g[u]+byte(k) {
				t.Fatalf("unit at %d split: %v", u, g[u:u+8])
			}
		}
	}
}

func TestDeinterleaverRestoresTheView(t *testing.T) {
	// Code, interleave, BPSK-free wire with errors, deinterleave, decode: the pre-FEC tap sees
	// exactly the flipped channel bits, the decoder the message.
	for _, il := range []*fec.Interleaver{fec.BlockInterleaver(8, 16), fec.RandomInterleaver()} {
		c := fec.Conv()
		w := &flips{at: []int{3, 50, 51, 52, 200}}
		l := link.Chain(&linktest.Source{N: 250}, c.Encoder(), il.Interleave(), w, il.Deinterleave(), c.Decoder())
		got := run(t, l, 5, 1)
		if pre := got[link.TapPre]; pre.Errors != 5*5 || pre.Trials != 5*512 {
			t.Errorf("pre-FEC tap %+v, want 25 errors in 2560", pre)
		}
		if ber := got[link.TapBER]; ber.Errors != 0 {
			t.Errorf("%d bit errors after decoding", ber.Errors)
		}
	}
}

func TestInterleaverBreaksBursts(t *testing.T) {
	// A burst of 12 channel errors defeats the K = 7 code (free distance 10) when it reaches the
	// decoder in one piece, and not when a 16 × 32 interleaver spreads it 32 bits apart
	// (common practice, no source).
	burst := make([]int, 12)
	for i := range burst {
		burst[i] = 100 + i
	}
	plain := fec.Conv()
	l := link.Chain(&linktest.Source{N: 250}, plain.Encoder(), &flips{at: burst}, plain.Decoder())
	if run(t, l, 1, 2)[link.TapBER].Errors == 0 {
		t.Fatal("the burst did not hurt the code without interleaving")
	}
	c, il := fec.Conv(), fec.BlockInterleaver(16, 32)
	l = link.Chain(&linktest.Source{N: 250}, c.Encoder(), il.Interleave(), &flips{at: burst}, il.Deinterleave(), c.Decoder())
	if e := run(t, l, 1, 2)[link.TapBER].Errors; e != 0 {
		t.Errorf("%d bit errors with interleaving", e)
	}
}

func TestConcatenatedStack(t *testing.T) {
	// RS(204, 188) outer code, random interleaver, K = 7 inner code, as in DVB-S (ETSI EN 300 421
	// §4.4–4.5, with a block byte interleaver of depth 2 instead of its convolutional one): decoders pass on f.Out, the
	// deinterleaver between them works on f.Out, the pre-FEC tap stays on the channel bits.
	rs, il, cc := fec.RS(204, 188), fec.BlockInterleaver(2, 204).Group(8), fec.Conv().Puncture("3/4")
	w := &flips{at: []int{10, 11, 12, 13, 14, 15, 16, 17, 18, 19, 20, 21, 22, 23, 24, 25, 900}}
	l := link.Chain(&linktest.Source{N: 2 * 188 * 8}, rs.Encoder(), il.Interleave(), cc.Encoder(), w,
		cc.Decoder(), il.Deinterleave(), rs.Decoder())
	var f link.Frame
	counts := make([]link.Tally, len(l.Taps()))
	if err := l.Run(&f, 1, 0, 0, counts); err != nil {
		t.Fatal(err)
	}
	coded := 2 * 204 * 8
	sent := (coded + 6) / 3 * 4 // 3/4 of the mother code's 2(coded + 6) bits
	if counts[2].Trials != int64(sent) || counts[2].Errors != int64(len(w.at)) {
		t.Errorf("pre-FEC tap %+v, want %d errors in %d", counts[2], len(w.at), sent)
	}
	if counts[0].Errors != 0 {
		t.Errorf("%d bit errors after decoding", counts[0].Errors)
	}
	if want := float64(2*188*8) / float64(sent); f.CodeRate != want {
		t.Errorf("CodeRate %v, want %v", f.CodeRate, want)
	}
}

func TestDeinterleaverNeedsItsInterleaver(t *testing.T) {
	il := fec.RandomInterleaver()
	f := &link.Frame{Hard: make([]byte, 8), Coded: make([]byte, 8)}
	if err := il.Deinterleave().Process(f, nil); err == nil {
		t.Error("deinterleaving without an interleaved frame gave no error")
	}
}
