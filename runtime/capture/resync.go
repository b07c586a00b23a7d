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
