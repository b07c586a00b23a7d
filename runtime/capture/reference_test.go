package capture

import (
	"bytes"
	"math/rand/v2"
	"testing"
)

// randomRef is n random bits (a fixed seed).
func randomRef(n int, seed uint64) []byte {
	r := rand.New(rand.NewPCG(seed, 1))
	b := make([]byte, n)
	for i := range b {
		b[i] = byte(r.IntN(2))
	}
	return b
}

// cyclic is n bits of ref repeated, starting at reference bit off.
func cyclic(ref []byte, off, n int) []byte {
	out := make([]byte, n)
	for i := range out {
		out[i] = ref[(off+i)%len(ref)]
	}
	return out
}

func TestReferenceOffsetAndSlip(t *testing.T) {
	ref := randomRef(10_007, 5) // a length that is no multiple of 8 or 64: ascii holds it exactly
	for _, inv := range []bool{false, true} {
		b := cyclic(ref, 1234, 120_001)
		if inv {
			for i := range b {
				b[i] ^= 1
			}
		}
		b, _, at2 := slipped(b, 30_000, 70_000)
		b = b[:120_000]
		errs := randomErrors(b, 2e-4, 9)
		c, err := Count(bytes.NewReader(asASCII(b)), Options{Format: ASCII, Ref: bytes.NewReader(asASCII(ref)), RefName: "ref.txt"})
		if err != nil {
			t.Fatal(err)
		}
		if c.Offset != 1234 || c.Inverted != inv {
			t.Errorf("inverted %v: offset %d (want 1234), inverted %v", inv, c.Offset, c.Inverted)
		}
		if c.Errors != int64(len(errs)) {
			t.Errorf("inverted %v: %d errors, injected %d", inv, c.Errors, len(errs))
		}
		if len(c.Slips) != 2 || c.Slips[0].Shift != 1 || c.Slips[1].Shift != -1 || abs64(c.Slips[1].Bit-int64(at2)) > 2+c.Slips[1].Spread {
			t.Errorf("inverted %v: slips %+v", inv, c.Slips)
		}
	}
}

// A reference shorter than a word repeats many times within one.
func TestShortReference(t *testing.T) {
	ref := []byte{1, 1, 0, 1, 0, 0, 0, 1, 1, 0, 1}
	b := cyclic(ref, 4, 8000)
	flip(b, 100, 5000)
	c, err := Count(bytes.NewReader(pack(b, false)), Options{Ref: bytes.NewReader(asASCII(ref)), RefName: "r", Format: Binary})
	if err == nil {
		t.Fatal("a reference in another format than the capture was accepted")
	}
	c, err = Count(bytes.NewReader(asASCII(b)), Options{Ref: bytes.NewReader(asASCII(ref)), RefName: "r", Format: ASCII})
	if err != nil {
		t.Fatal(err)
	}
	if c.Errors != 2 || c.Offset != 4 {
		t.Errorf("errors %d offset %d", c.Errors, c.Offset)
	}
}

// A polarity flip in mid-capture (a receiver's phase ambiguity resolved the other way) is a
// change of alignment with no shift, not half a capture of errors.
func TestPolarityFlip(t *testing.T) {
	b := prbsBits(t, 15, 100_000, false)
	for i := 40_000; i < len(b); i++ {
		b[i] ^= 1
	}
	errs := randomErrors(b, 1e-4, 2)
	c := countBytes(t, pack(b, false), Options{PRBS: 15})
	if c.Errors != int64(len(errs)) || len(c.Slips) != 1 || !c.Slips[0].Polarity || c.Slips[0].Shift != 0 || !c.Slips[0].Inverted {
		t.Errorf("errors %d (injected %d), slips %+v", c.Errors, len(errs), c.Slips)
	}
}

// Junk before the pattern (a receiver not yet locked) is not compared.
func TestJunkBeforeLock(t *testing.T) {
	b := append(randomRef(296, 3), prbsBits(t, 20, 50_000, false)...)
	errs := 0
	for i := 1000; i < len(b); i += 997 {
		b[i] ^= 1
		errs++
	}
	c := countBytes(t, pack(b, false), Options{PRBS: 20})
	if c.Errors != int64(errs) || c.Before > 296 || c.Before < 280 || c.LockBit != c.Before {
		t.Errorf("errors %d (want %d), %d bits before lock (want about 296)", c.Errors, errs, c.Before)
	}
}
