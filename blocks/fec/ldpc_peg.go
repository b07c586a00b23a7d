package fec

import (
	"fmt"

	"tally/blocks/rng"
)

// LDPCPEG is an LDPC code of length n and rate about k/n whose Tanner graph is built by
// progressive edge growth (Hu, Eleftheriou and Arnold, Regular and irregular progressive
// edge-growth Tanner graphs, IEEE Trans. Inf. Theory, 2005): every variable node gets col
// edges, one at a time, each to a check node as far from it in the graph built so far as
// possible (a check not reached at all if one exists, else one reached last by a breadth-first
// expansion), the least used such check, ties broken by a fixed pseudo-random draw. That keeps
// short cycles out, so the local girth is large. col = 3 with k = n/2 is the regular (3, 6) code.
//
// The graph follows the upper-triangular variant of the same paper (§V): the parity bit j (column
// k + j) takes row j as its first edge and its other edges among the rows after j, so the parity
// part of H is lower triangular and encoding is a linear-time back-substitution. The last parity
// columns have fewer than col edges (the last has one, and an edge that would close a 4-cycle is
// left out). The parity columns are placed first, from the last, then the message columns, which
// keeps the row weights within about one of the mean.
//
// The construction is deterministic: the same (n, k, col) give the same code on every machine.
// Its cost grows as n²: well under a second for n = 2048, tens of seconds on one core for
// n = 20 000 (keep a long code as alist text to load it at once).
func LDPCPEG(n, k, col int) *LDPCCode {
	name := fmt.Sprintf("fec.LDPCPEG(%d, %d, %d)", n, k, col)
	switch {
	case n < 8 || n > 1<<22:
		return newLDPC(name, nil, fmt.Errorf("n = %d must lie in 8…4194304", n))
	case k < 1 || k >= n-1:
		return newLDPC(name, nil, fmt.Errorf("k = %d must lie in 1…n−2", k))
	case col < 2 || col > 12 || col > n-k:
		return newLDPC(name, nil, fmt.Errorf("col = %d must lie in 2…12 and not exceed n − k", col))
	}
	g, err := cachedGraph(name, func() (*ldpcGraph, error) { return buildPEG(n, k, col) })
	return newLDPC(name, g, err)
}

func buildPEG(n, k, col int) (*ldpcGraph, error) {
	m := n - k
	varChecks := make([][]int32, n)
	checkVars := make([][]int32, m)
	r := rng.New(rng.Key(0x9e6, n, k, col))
	stamp := make([]int32, m)  // BFS mark: stamp[c] == current when c has been reached
	level := make([]int32, m)  // BFS level at which c was reached
	vstamp := make([]int32, n) // BFS mark of variables already expanded
	var cur int32
	var frontier, nextF, cands []int32
	pick := func(cands []int32) int32 {
		best, ties := int32(-1), 0
		for _, c := range cands {
			d := len(checkVars[c])
			switch {
			case best < 0 || d < len(checkVars[best]):
				best, ties = c, 1
			case d == len(checkVars[best]):
				ties++
				if r.IntN(ties) == 0 {
					best = c
				}
			}
		}
		return best
	}
	connect := func(v, c int32) {
		varChecks[v] = append(varChecks[v], c)
		checkVars[c] = append(checkVars[c], v)
	}
	for i := 0; i < n; i++ {
		// The parity columns first, from the last: the last ones have little choice, and the
		// earlier ones and the message columns then avoid the rows they loaded.
		v := i
		if i < m {
			v = n - 1 - i
		} else {
			v = i - m
		}
		lo := int32(0) // checks allowed: lo … m−1
		if v >= k {
			lo = int32(v - k)
			connect(int32(v), lo) // the diagonal
			lo++
		}
		for e := len(varChecks[v]); e < col; e++ {
			if lo >= int32(m) {
				break
			}
			cands = cands[:0]
			if e == 0 {
				for c := lo; c < int32(m); c++ {
					cands = append(cands, c)
				}
				connect(int32(v), pick(cands))
				continue
			}
			// Breadth-first expansion from v over the graph so far.
			cur++
			vstamp[v] = cur
			frontier = frontier[:0]
			reached := 0
			for _, c := range varChecks[v] {
				if stamp[c] != cur {
					stamp[c], level[c] = cur, 0
					frontier = append(frontier, c)
					reached++
				}
			}
			depth := int32(0)
			for {
				// The next level; it stops as soon as every check is reached, since the
				// candidates are then the checks this level reached.
				nextF = nextF[:0]
			expand:
				for _, c := range frontier {
					for _, u := range checkVars[c] {
						if vstamp[u] == cur {
							continue
						}
						vstamp[u] = cur
						for _, c2 := range varChecks[u] {
							if stamp[c2] != cur {
								stamp[c2], level[c2] = cur, depth+1
								nextF = append(nextF, c2)
								if reached++; reached == m {
									break expand
								}
							}
						}
					}
				}
				if len(nextF) == 0 || reached == m {
					break
				}
				depth++
				frontier, nextF = nextF, frontier
			}
			if reached < m {
				// Some checks are out of reach: take the least used of those allowed.
				for c := lo; c < int32(m); c++ {
					if stamp[c] != cur {
						cands = append(cands, c)
					}
				}
			} else {
				// All reached: take those reached last (farthest), allowed.
				for _, c := range nextF {
					if c >= lo {
						cands = append(cands, c)
					}
				}
			}
			if len(cands) == 0 {
				// The farthest checks are not allowed (triangular part): the farthest allowed
				// checks not yet connected.
				best := int32(0)
				for c := lo; c < int32(m); c++ {
					if stamp[c] == cur && level[c] > best {
						best = level[c]
					}
				}
				for c := lo; c < int32(m); c++ {
					if best >= 2 && stamp[c] == cur && level[c] == best { // no 4-cycle
						cands = append(cands, c)
					}
				}
				if len(cands) == 0 {
					break
				}
			}
			connect(int32(v), pick(cands))
		}
	}
	rows := make([][]int32, m)
	for c, vs := range checkVars {
		rows[c] = append([]int32(nil), vs...)
		sortInt32(rows[c])
	}
	return graphFromRows(n, rows)
}

func sortInt32(s []int32) {
	for i := 1; i < len(s); i++ {
		for j := i; j > 0 && s[j] < s[j-1]; j-- {
			s[j], s[j-1] = s[j-1], s[j]
		}
	}
}
