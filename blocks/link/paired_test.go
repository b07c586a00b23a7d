package link_test

import (
	"slices"
	"testing"

	"tally/blocks/channel"
	"tally/blocks/equalize"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/rng"
	"tally/blocks/source"
)

// probe records the samples it sees in every frame, by frame index.
func probe(name string, into map[int][]complex128) link.Block {
	return link.Func(name, func(f *link.Frame, r *rng.Stream) {
		into[f.Index] = slices.Clone(f.Samples)
	})
}

// Pairing by role: a block without randomness inserted in one variant (a known-channel
// equaliser before the noise, so it only rescales nothing here: a one-tap identity) leaves the
// other variant's source bits and noise unchanged, sample for sample, in every frame; keyed
// by position, as an unpaired link is, the same insertion shifts the noise's stream and the
// samples differ.
func TestPairedNoiseKeyedByRole(t *testing.T) {
	build := func(insert bool, after map[int][]complex128) *link.Link {
		m := modem.QPSK()
		l := link.Chain(source.Random(256), m.Mod())
		if insert {
			l.Add(equalize.ZF([]complex128{1}, 1)) // no randomness; identity for an ideal channel
		}
		return l.Add(channel.AWGN(4), probe("probe", after), m.Demod())
	}
	a, b := map[int][]complex128{}, map[int][]complex128{}
	p := link.Paired([]string{"A", "B"}, build(false, a), build(true, b))
	if err := p.Check(); err != nil {
		t.Fatal(err)
	}
	counts := make([]link.Tally, len(p.Taps()))
	var f link.Frame
	for idx := range 5 {
		if err := p.Run(&f, 7, 3, idx, counts); err != nil {
			t.Fatal(err)
		}
		if len(a[idx]) != 128 || !slices.Equal(a[idx], b[idx]) {
			t.Fatalf("frame %d: the variants' samples after the noise differ", idx)
		}
	}
	// The same two links unpaired: the noise block sits at position 2 in one and 3 in the other.
	a2, b2 := map[int][]complex128{}, map[int][]complex128{}
	la, lb := build(false, a2), build(true, b2)
	c := make([]link.Tally, len(la.Taps()))
	if err := la.Run(&f, 7, 3, 0, c); err != nil {
		t.Fatal(err)
	}
	if err := lb.Run(&f, 7, 3, 0, c); err != nil {
		t.Fatal(err)
	}
	if slices.Equal(a2[0], b2[0]) {
		t.Fatal("unpaired links keyed by position drew the same noise after an insertion; the test no longer shows the pairing")
	}
}

// The imaginary noise a channel leaves pending on a real (BPSK) signal belongs to the noise's
// role: the variant whose first complex block comes later, after an inserted block, still gets
// the same imaginary noise.
func TestPairedPendingNoiseKeyedByRole(t *testing.T) {
	build := func(insert bool, after map[int][]complex128) *link.Link {
		m := modem.BPSK()
		l := link.Chain(source.Random(64), m.Mod(), channel.AWGN(3))
		if insert {
			l.Add(link.Func("spare", func(f *link.Frame, r *rng.Stream) { r.Float64() }))
		}
		mix := link.Func("mix", func(f *link.Frame, r *rng.Stream) { f.MakeComplex(r) })
		return l.Add(mix, probe("probe", after), m.Demod())
	}
	a, b := map[int][]complex128{}, map[int][]complex128{}
	p := link.Paired([]string{"A", "B"}, build(false, a), build(true, b))
	counts := make([]link.Tally, len(p.Taps()))
	var f link.Frame
	if err := p.Run(&f, 1, 0, 0, counts); err != nil {
		t.Fatal(err)
	}
	if imag(a[0][0]) == 0 || !slices.Equal(a[0], b[0]) {
		t.Fatalf("complex samples differ between the variants (or carry no imaginary noise): %v vs %v", a[0][:2], b[0][:2])
	}
}

// A paired link's counts against their definitions on the frames' decisions (common
// practice, no source: McNemar's discordant pairs): each variant's errors, the bits wrong in
// one variant only, and wrongA − wrongB = onlyA − onlyB in every frame.
func TestPairedCounts(t *testing.T) {
	var outA, outB, bits []byte
	keep := func(dst *[]byte) link.Block {
		return link.Func("keep", func(f *link.Frame, r *rng.Stream) { *dst = slices.Clone(f.Hard) })
	}
	src := func() link.Block {
		return link.Func("bits", func(f *link.Frame, r *rng.Stream) {
			b := make([]byte, 512)
			r.Bits(b)
			f.Bits, f.Coded = b, b
			bits = b
		}).Draws("source")
	}
	mk := func(db float64, dst *[]byte) *link.Link {
		m := modem.BPSK()
		return link.Chain(src(), m.Mod(), channel.AWGN(db), m.Demod(), keep(dst))
	}
	p := link.Paired([]string{"ref", "var"}, mk(1, &outA), mk(2, &outB))
	taps := p.Taps()
	want := []string{"ber", "fer", "var/ber", "var/fer", "var/only_ref", "var/only_variant", "var/discordant"}
	if !slices.Equal(taps, want) {
		t.Fatalf("taps %v, want %v", taps, want)
	}
	var f link.Frame
	var sumA, sumB int64
	for idx := range 20 {
		c := make([]link.Tally, len(taps))
		if err := p.Run(&f, 11, 0, idx, c); err != nil {
			t.Fatal(err)
		}
		var wa, wb, oa, ob int64
		for i := range bits {
			ea, eb := outA[i] != bits[i], outB[i] != bits[i]
			if ea {
				wa++
			}
			if eb {
				wb++
			}
			if ea && !eb {
				oa++
			}
			if eb && !ea {
				ob++
			}
		}
		if c[0].Errors != wa || c[2].Errors != wb || c[4].Errors != oa || c[5].Errors != ob || c[6].Errors != oa+ob {
			t.Fatalf("frame %d: counts %+v, want errors %d %d, only %d %d", idx, c, wa, wb, oa, ob)
		}
		if c[0].Errors-c[2].Errors != c[4].Errors-c[5].Errors {
			t.Fatalf("frame %d: the difference of errors is not the difference of the discordant counts", idx)
		}
		sumA += wa
		sumB += wb
	}
	if sumB >= sumA {
		t.Fatalf("1 dB more Eb/N0 on the same noise gave %d errors against %d", sumB, sumA)
	}
}

// OnlyWrong against its definition, for lengths around the word size.
func TestOnlyWrong(t *testing.T) {
	s := rng.New(5)
	for n := range 40 {
		ba, oa, bb, ob := make([]byte, n), make([]byte, n), make([]byte, n), make([]byte, n)
		for _, x := range [][]byte{ba, oa, bb, ob} {
			s.Bits(x)
		}
		var wa, wb int64
		for i := range n {
			if ba[i] != oa[i] && bb[i] == ob[i] {
				wa++
			}
			if bb[i] != ob[i] && ba[i] == oa[i] {
				wb++
			}
		}
		if a, b := link.OnlyWrong(ba, oa, bb, ob); a != wa || b != wb {
			t.Fatalf("n = %d: %d, %d; want %d, %d", n, a, b, wa, wb)
		}
	}
}

// Variants that send different numbers of bits cannot be compared bit by bit.
func TestPairedRefusesUnequalFrames(t *testing.T) {
	mk := func(n int) *link.Link {
		m := modem.BPSK()
		return link.Chain(source.Random(n), m.Mod(), channel.AWGN(3), m.Demod())
	}
	p := link.Paired([]string{"short", "long"}, mk(64), mk(128))
	var f link.Frame
	err := p.Run(&f, 1, 0, 0, make([]link.Tally, len(p.Taps())))
	if err == nil {
		t.Fatal("no error for variants of 64 and 128 bits a frame")
	}
	if link.Paired([]string{"one"}, mk(64)).Check() == nil {
		t.Fatal("a single variant was accepted")
	}
}
