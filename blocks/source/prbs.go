package source

import (
	"fmt"
	"math/bits"

	"tally/blocks/internal/limit"
	"tally/blocks/link"
	"tally/blocks/rng"
)

// PRBSSequence emits a pseudo-random binary sequence: the maximal-length sequence of an
// Order-stage linear feedback shift register, period 2^Order − 1, N bits per frame.
//
// With feedback polynomial x^n + x^k + 1 the register XORs its stages k and n and feeds the
// result back to stage 1, so the sequence obeys a[t] = a[t−k] ⊕ a[t−n]. The polynomials are
// those of ITU-T Recommendation O.150 (from memory):
//
//	order  7: x^7 + x^6 + 1      order 20: x^20 + x^3 + 1
//	order  9: x^9 + x^5 + 1      order 23: x^23 + x^18 + 1
//	order 11: x^11 + x^9 + 1     order 29: x^29 + x^27 + 1
//	order 15: x^15 + x^14 + 1    order 31: x^31 + x^28 + 1
//
// The register starts with all stages at one, which is a[0] … a[n−1] = 1. O.150 sends the
// 2^15−1, 2^23−1 and 2^29−1, 2^31−1 sequences inverted (from memory): Inverted is set for those
// orders by PRBS and can be changed with Invert.
//
// The sequence runs on across frames: frame f carries bits f·N … f·N + N − 1 (mod the period)
// of one endless sequence. Frames are independent all the same: the register state at offset s
// is computed by jumping, from x^s mod the recurrence's characteristic polynomial over GF(2)
// (square and multiply), so no state passes from frame to frame.
type PRBSSequence struct {
	Order    int  // register length n: 7, 9, 11, 15, 20, 23, 29 or 31
	N        int  // bits per frame, ≥ 1
	Inverted bool // emit the complement of the register output

	tap   int // k of x^n + x^k + 1
	buf   []byte
	exact bool // Exact: never rounded (framelen.go)
}

// prbsTaps maps an order n to the k of its O.150 polynomial x^n + x^k + 1.
var prbsTaps = map[int]int{7: 6, 9: 5, 11: 9, 15: 14, 20: 3, 23: 18, 29: 27, 31: 28}

// PRBS is the ITU-T O.150 sequence of the given order, n bits per frame, for example
// source.PRBS(23, 4096).
func PRBS(order, n int) *PRBSSequence {
	return &PRBSSequence{Order: order, N: n, Inverted: order == 15 || order == 23 || order == 29 || order == 31,
		tap: prbsTaps[order]}
}

// Invert sets whether the output is complemented.
func (s *PRBSSequence) Invert(on bool) *PRBSSequence { s.Inverted = on; return s }

// Name is "source.PRBS".
func (s *PRBSSequence) Name() string { return "source.PRBS" }

// Err reports an order without an O.150 polynomial or a frame below one bit.
func (s *PRBSSequence) Err() error {
	if _, ok := prbsTaps[s.Order]; !ok {
		return fmt.Errorf("source.PRBS: order %d is not one of 7, 9, 11, 15, 20, 23, 29, 31", s.Order)
	}
	if s.N < 1 {
		return fmt.Errorf("source.PRBS: n = %d bits per frame must be at least 1", s.N)
	}
	return limit.Frame("source.PRBS", "n", s.N)
}

// Period is the length of the sequence, 2^Order − 1.
func (s *PRBSSequence) Period() uint64 { return 1<<uint(s.Order) - 1 }

// Process writes the frame's stretch of the sequence.
func (s *PRBSSequence) Process(f *link.Frame, r *rng.Stream) error {
	if err := s.Err(); err != nil {
		return err
	}
	s.tap = prbsTaps[s.Order]
	s.buf = link.GrowBytes(s.buf, s.N)
	w := s.window(mulMod(uint64(f.Index), uint64(s.N), s.Period()))
	s.fill(s.buf, w)
	emit(f, s.buf)
	return nil
}

// fill writes len(dst) bits of the sequence starting from the window w (bit i = a[t+i]).
func (s *PRBSSequence) fill(dst []byte, w uint64) {
	n, back := uint(s.Order), uint(s.Order-s.tap)
	inv := byte(0)
	if s.Inverted {
		inv = 1
	}
	for i := range dst {
		dst[i] = byte(w&1) ^ inv
		nb := (w ^ w>>back) & 1 // a[t+n] = a[t] ⊕ a[t+n−k]
		w = w>>1 | nb<<(n-1)
	}
}

// window is the register contents at offset off: bit i is a[off+i], i < Order.
//
// The recurrence a[t+n] = a[t] ⊕ a[t+n−k] has characteristic polynomial
// q(x) = x^n + x^(n−k) + 1; if x^s mod q = Σ c_j x^j then a[s] = Σ c_j a[j] (mod 2).
func (s *PRBSSequence) window(off uint64) uint64 {
	n := uint(s.Order)
	q := uint64(1)<<n | uint64(1)<<(n-uint(s.tap)) | 1
	start := uint64(1)<<n - 1 // a[0 … n−1] = 1
	c := polyPowX(off, q, n)
	var w uint64
	for i := range n {
		w |= uint64(bits.OnesCount64(c&start)&1) << i
		c = polyMulMod(c, 2, q, n) // times x
	}
	return w
}

// polyPowX is x^e mod q over GF(2), q of degree n (bit i is the coefficient of x^i).
func polyPowX(e, q uint64, n uint) uint64 {
	result := uint64(1)
	base := polyMulMod(2, 1, q, n) // x mod q (q has degree ≥ 2)
	for e > 0 {
		if e&1 == 1 {
			result = polyMulMod(result, base, q, n)
		}
		base = polyMulMod(base, base, q, n)
		e >>= 1
	}
	return result
}

// polyMulMod is a·b mod q over GF(2), with a, b of degree < n ≤ 31 so the product fits in 64
// bits.
func polyMulMod(a, b, q uint64, n uint) uint64 {
	var p uint64
	for b != 0 {
		if b&1 == 1 {
			p ^= a
		}
		a <<= 1
		b >>= 1
	}
	for d := uint(63 - bits.LeadingZeros64(p|1)); d >= n && p != 0; d = uint(63 - bits.LeadingZeros64(p|1)) {
		p ^= q << (d - n)
	}
	return p
}
