package capture

import (
	"bytes"
	"fmt"
	"math/bits"
	"math/rand/v2"
	"testing"

	"tally/blocks/link"
	"tally/blocks/source"
)

// Generated captures with known truth. The pattern bits come from tally's own PRBS source
// (blocks/source), so the counter is checked against an independent generator of the
// O.150 sequences, not against itself.

// prbsBits is n bits of the O.150 sequence of the order, as source.PRBS emits it (one bit a
// byte), with the polarity asked for.
func prbsBits(t testing.TB, order, n int, inverted bool) []byte {
	t.Helper()
	s := source.PRBS(order, n).Invert(inverted)
	f := &link.Frame{}
	if err := s.Process(f, nil); err != nil {
		t.Fatal(err)
	}
	return append([]byte(nil), f.Bits...)
}

// flip inverts the bits at the given positions.
func flip(b []byte, at ...int) {
	for _, p := range at {
		b[p] ^= 1
	}
}

// randomErrors flips each bit with probability p (a fixed seed) and returns the positions.
func randomErrors(b []byte, p float64, seed uint64) []int {
	r := rand.New(rand.NewPCG(seed, 7))
	var at []int
	for i := range b {
		if r.Float64() < p {
			b[i] ^= 1
			at = append(at, i)
		}
	}
	return at
}

// pack writes bits as packed bytes, first bit in the most (or least) significant place.
func pack(b []byte, lsb bool) []byte {
	out := make([]byte, (len(b)+7)/8)
	for i, v := range b {
		if v == 0 {
			continue
		}
		if lsb {
			out[i/8] |= 1 << (i % 8)
		} else {
			out[i/8] |= 0x80 >> (i % 8)
		}
	}
	return out
}

func asASCII(b []byte) []byte {
	var buf bytes.Buffer
	for i, v := range b {
		buf.WriteByte('0' + v)
		if i%72 == 71 {
			buf.WriteString("\r\n")
		} else if i%8 == 7 {
			buf.WriteByte(' ')
		}
	}
	return buf.Bytes()
}

func asHex(b []byte, lsb bool) []byte {
	var buf bytes.Buffer
	for i, v := range pack(b, lsb) {
		fmt.Fprintf(&buf, "%02X", v)
		if i%16 == 15 {
			buf.WriteByte('\n')
		} else {
			buf.WriteByte(' ')
		}
	}
	return buf.Bytes()
}

func countBytes(t testing.TB, data []byte, o Options) *Counts {
	t.Helper()
	c, err := Count(bytes.NewReader(data), o)
	if err != nil {
		t.Fatal(err)
	}
	return c
}

var _ = bits.OnesCount64
