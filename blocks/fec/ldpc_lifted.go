package fec

import (
	"fmt"
	"strings"
)

// LDPCLifted is the quasi-cyclic LDPC code lifted from a base matrix by circulants of size z:
// every entry s ≥ 0 of the mb × nb base becomes the z × z identity cyclically shifted by s
// (row r of the block has its one in column (r + s) mod z), every −1 a zero block, so H is
// mb·z × nb·z (the construction of the quasi-cyclic codes of IEEE 802.16e and 802.11n;
// Fossorier, Quasi-cyclic LDPC codes from circulant permutation matrices, IEEE Trans. Inf.
// Theory, 2004). A parity part (last mb base columns) in staircase form, shift 0 on the diagonal
// and just below it and −1 above it, gives the linear-time encoder; any other full-rank base
// is encoded through the elimination (see LDPCCode).
func LDPCLifted(base [][]int, z int) *LDPCCode {
	name := fmt.Sprintf("fec.LDPCLifted(%d×%d base, z = %d)", len(base), rowLen(base), z)
	if z < 1 || z > 1<<16 {
		return newLDPC(name, nil, fmt.Errorf("z = %d must lie in 1…65536", z))
	}
	mb, nb := len(base), rowLen(base)
	var key strings.Builder
	fmt.Fprintf(&key, "lifted %d", z)
	for i, row := range base {
		if len(row) != nb {
			return newLDPC(name, nil, fmt.Errorf("base row %d has %d entries, row 1 has %d", i+1, len(row), nb))
		}
		for j, s := range row {
			if s < -1 || s >= z {
				return newLDPC(name, nil, fmt.Errorf("base entry (%d, %d) = %d must be −1 or a shift in 0…%d", i+1, j+1, s, z-1))
			}
			fmt.Fprintf(&key, " %d", s)
		}
	}
	g, err := cachedGraph(key.String(), func() (*ldpcGraph, error) {
		rows := make([][]int32, mb*z)
		for i, row := range base {
			for r := 0; r < z; r++ {
				for j, s := range row {
					if s >= 0 {
						rows[i*z+r] = append(rows[i*z+r], int32(j*z+(r+s)%z))
					}
				}
			}
		}
		return graphFromRows(nb*z, rows)
	})
	return newLDPC(name, g, err)
}

func rowLen(base [][]int) int {
	if len(base) == 0 {
		return 0
	}
	return len(base[0])
}
