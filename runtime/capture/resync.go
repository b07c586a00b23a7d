package capture

import "math/bits"

// Where an alignment changed. After a loss of alignment the counter holds the stretch of
// capture between the last bits it trusts and the bits where it found the pattern again,
// with the error masks of both alignments over it. It splits the stretch at s1 ≤ s2: bits
// before s1 are compared against the old alignment, bits from s2 on against the new, and the
// bits between (if any) against neither, as lost. The split minimises
//
//	errors_old[0, s1) + lostCost(s2 − s1) + errors_new[s2, n),  lostCost(L) = L/4 + 8 (L > 0),
//
// so a clean slip (either alignment fits on its side) costs no spurious error and no lost bit,
// while a stretch of garbage is given up as lost only when it is long and dense (more errors
// than a quarter of its bits plus eight) — a few true errors beside a slip are never absorbed.
// Without an old alignment (the first lock) s1 = 0; without a new one (the end of the
// capture) s2 = n. Costs are kept in quarters, so the sums are exact integers.
const (
	lostPerBit = 1  // quarter-errors a lost bit costs
	lostFixed  = 32 // quarter-errors a lost stretch costs
)

// cut returns s1, s2 and, when there is no lost stretch, the first and last split positions
// of equal cost (the bits there agree with both alignments): lo ≤ s1 = s2 ≤ hi.
func cut(oldErr, newErr []uint64, n int) (s1, s2, lo, hi int) {
	bit := func(m []uint64, i int) int { return int(m[i>>6] >> uint(i&63) & 1) }
	// suf[j] = new errors in [j, n)
	suf := make([]int32, n+1)
	if newErr != nil {
		for j := n - 1; j >= 0; j-- {
			suf[j] = suf[j+1] + int32(bit(newErr, j))
		}
	}
	lostCost := func(l int) int {
		if l == 0 {
			return 0
		}
		return l*lostPerBit + lostFixed
	}
	best := int(^uint(0) >> 1)
	pre := 0                // old errors in [0, j)
	bestTerm, bestI := 0, 0 // min over i < j of 4·pre(i) − i
	for j := 0; j <= n; j++ {
		// candidates ending the old alignment at i and starting the new at j
		var cost, i int
		switch {
		case oldErr == nil:
			cost, i = lostCost(j)+4*int(suf[j]), 0
		case newErr == nil:
			cost, i = 4*pre+lostCost(n-j), j
		default:
			cost, i = 4*pre+4*int(suf[j]), j // no lost bits
			if j > 0 {
				if c := bestTerm + j*lostPerBit + lostFixed + 4*int(suf[j]); c < cost {
					cost, i = c, bestI
				}
			}
		}
		switch {
		case cost < best:
			best, s1, s2 = cost, i, j
			if newErr == nil {
				s2 = n
			}
			lo, hi = j, j
		case cost == best && i == j && s1 == s2:
			hi = j
		}
		if oldErr != nil && j < n {
			// i = j becomes available for later j
			if t := 4*pre - j*lostPerBit; j == 0 || t < bestTerm {
				bestTerm, bestI = t, j
			}
			pre += bit(oldErr, j)
		}
	}
	if s1 != s2 {
		lo, hi = s1, s1
	}
	return s1, s2, lo, hi
}

// popcount of a word slice (tests and reports).
func popcount(m []uint64) int {
	n := 0
	for _, w := range m {
		n += bits.OnesCount64(w)
	}
	return n
}

// twoSlips looks, in a region where the alignment is the same at both ends, for two slips that
// cancel (+d then −d, |d| ≤ 2, a clock that slipped and caught up): if a middle stretch fits
// the alignment moved by d, not the old one, and so explains at least twoSlipGain more
// errors, the region is committed that way with both slips, and it returns true. Two such
// slips closer than a few hundred bits do not set off the search (too few errors between
// them) and are counted as a burst of errors.
func (c *counter) twoSlips(base int64, rx, oldErr []uint64, old alignment, n int) bool {
	best, bestD, b1, b2 := 4*popcount(oldErr), int64(0), 0, 0
	for _, d := range []int64{-2, -1, 1, 2} {
		g := c.pat.expect(c.pat.moved(old, d), base)
		mid := make([]uint64, len(rx))
		for i := range mid {
			mid[i] = rx[i] ^ g.next()
		}
		s1, s2, cost := cut3(oldErr, mid, n)
		// the middle must fit the moved alignment (an error ratio below 1/16) and not the old
		// one (above 1/4): a burst of errors favours some stretch by chance, never by that much
		l, em, eo := s2-s1, countBits(mid, s1, s2), countBits(oldErr, s1, s2)
		if cost+4*twoSlipGain <= best && 16*em <= l && 4*eo >= l {
			best, bestD, b1, b2 = cost, d, s1, s2
		}
	}
	if bestD == 0 {
		return false
	}
	g := c.pat.expect(c.pat.moved(old, bestD), base)
	mid := make([]uint64, len(rx))
	for i := range mid {
		mid[i] = rx[i] ^ g.next()
	}
	commitBits(c.out, oldErr, base, 0, int64(b1))
	c.out.slip(Slip{Bit: base + int64(b1), Shift: bestD, Known: true, Inverted: old.inv, Regained: true})
	commitBits(c.out, mid, base, int64(b1), int64(b2))
	c.out.slip(Slip{Bit: base + int64(b2), Shift: -bestD, Known: true, Inverted: old.inv, Regained: true})
	commitBits(c.out, oldErr, base, int64(b2), int64(n))
	return true
}

// twoSlipGain is how many errors two cancelling slips must explain to be believed.
const twoSlipGain = 8

// cut3 splits [0, n) into old [0, s1), middle [s1, s2), old [s2, n) with the fewest errors
// (in quarters, as cut), s1 < s2.
func cut3(oldErr, midErr []uint64, n int) (s1, s2, cost int) {
	bit := func(m []uint64, i int) int { return int(m[i>>6] >> uint(i&63) & 1) }
	total := popcount(oldErr)
	// cost(s1, s2) = 4·(O[s1] + M[s2] − M[s1] + total − O[s2]), O and M prefix counts
	best := int(^uint(0) >> 1)
	o, m := 0, 0
	bestHead, bestI := 0, 0 // min over s1 < s2 of O[s1] − M[s1]
	for j := 0; j <= n; j++ {
		if j > 0 {
			if c := 4 * (bestHead + m + total - o); c < best {
				best, s1, s2 = c, bestI, j
			}
		}
		if h := o - m; j == 0 || h < bestHead {
			bestHead, bestI = h, j
		}
		if j < n {
			o += bit(oldErr, j)
			m += bit(midErr, j)
		}
	}
	return s1, s2, best
}

// countBits is the number of ones among bits [from, to) of m.
func countBits(m []uint64, from, to int) int {
	n := 0
	for i := from; i < to; i++ {
		n += int(m[i>>6] >> uint(i&63) & 1)
	}
	return n
}
