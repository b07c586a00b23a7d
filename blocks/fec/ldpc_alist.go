package fec

import (
	"crypto/sha256"
	"fmt"
	"strconv"
	"strings"
)

// LDPCAlist is the LDPC code whose parity-check matrix is given in the alist format, the plain
// text in which LDPC codes are commonly published (MacKay, Encyclopedia of Sparse Graph Codes):
//
//	N M                      columns and rows of H
//	cmax rmax                largest column and row weight
//	N column weights
//	M row weights
//	N lines: the rows (1-based) of the ones of each column, padded with 0 to cmax
//	M lines: the columns (1-based) of the ones of each row, padded with 0 to rmax
//
// The padding zeros may be left out. Both lists must describe the same matrix. The text is
// given, not a file name: blocks read no files (in a script, sim.ReadFile reads one from the
// script's folder).
func LDPCAlist(text string) *LDPCCode {
	sum := sha256.Sum256([]byte(text))
	name := "fec.LDPCAlist"
	g, err := cachedGraph(fmt.Sprintf("alist %x", sum), func() (*ldpcGraph, error) { return parseAlist(text) })
	c := newLDPC(name, g, err)
	if err == nil {
		c.name = fmt.Sprintf("fec.LDPCAlist(%d×%d)", c.M, c.N)
	}
	return c
}

func parseAlist(text string) (*ldpcGraph, error) {
	lines := strings.Split(strings.ReplaceAll(text, "\r\n", "\n"), "\n")
	li := 0
	// next returns the numbers of the next non-blank line and its line number.
	next := func(what string) ([]int, int, error) {
		for li < len(lines) && strings.TrimSpace(lines[li]) == "" {
			li++
		}
		if li >= len(lines) {
			return nil, 0, fmt.Errorf("alist ends before %s", what)
		}
		li++
		var out []int
		for _, f := range strings.Fields(lines[li-1]) {
			v, err := strconv.Atoi(f)
			if err != nil || v < 0 {
				return nil, li, fmt.Errorf("alist line %d: %q is not a whole number (reading %s)", li, f, what)
			}
			out = append(out, v)
		}
		return out, li, nil
	}
	head, at, err := next("the sizes")
	if err != nil {
		return nil, err
	}
	if len(head) != 2 || head[0] < 2 || head[1] < 1 || head[0] > 1<<24 || head[1] > 1<<24 {
		return nil, fmt.Errorf("alist line %d: want the two sizes N M, got %v", at, head)
	}
	n, m := head[0], head[1]
	if _, _, err := next("the largest weights"); err != nil {
		return nil, err
	}
	cw, at, err := next("the column weights")
	if err != nil {
		return nil, err
	}
	if len(cw) != n {
		return nil, fmt.Errorf("alist line %d: %d column weights for N = %d", at, len(cw), n)
	}
	rw, at, err := next("the row weights")
	if err != nil {
		return nil, err
	}
	if len(rw) != m {
		return nil, fmt.Errorf("alist line %d: %d row weights for M = %d", at, len(rw), m)
	}
	cols := make(map[[2]int]bool)
	for v := 0; v < n; v++ {
		r, at, err := next(fmt.Sprintf("column %d", v+1))
		if err != nil {
			return nil, err
		}
		count := 0
		for _, x := range r {
			if x == 0 {
				continue
			}
			if x > m {
				return nil, fmt.Errorf("alist line %d: row %d outside 1…%d", at, x, m)
			}
			cols[[2]int{x - 1, v}] = true
			count++
		}
		if count != cw[v] {
			return nil, fmt.Errorf("alist line %d: column %d lists %d rows, its weight is %d", at, v+1, count, cw[v])
		}
	}
	rows := make([][]int32, m)
	for i := 0; i < m; i++ {
		r, at, err := next(fmt.Sprintf("row %d", i+1))
		if err != nil {
			return nil, err
		}
		for _, x := range r {
			if x == 0 {
				continue
			}
			if x > n {
				return nil, fmt.Errorf("alist line %d: column %d outside 1…%d", at, x, n)
			}
			if !cols[[2]int{i, x - 1}] {
				return nil, fmt.Errorf("alist line %d: row %d lists column %d, which does not list row %d", at, i+1, x, i+1)
			}
			rows[i] = append(rows[i], int32(x-1))
		}
		if len(rows[i]) != rw[i] {
			return nil, fmt.Errorf("alist line %d: row %d lists %d columns, its weight is %d", at, i+1, len(rows[i]), rw[i])
		}
	}
	total := 0
	for _, r := range rows {
		total += len(r)
	}
	if total != len(cols) {
		return nil, fmt.Errorf("alist: the column lists hold %d ones, the row lists %d", len(cols), total)
	}
	return graphFromRows(n, rows)
}

// Alist writes the code's parity-check matrix in the alist format (with zero padding).
func (c *LDPCCode) Alist() string {
	g := c.g
	if g == nil {
		return ""
	}
	colRows := make([][]int, g.n)
	rmax := 0
	for i := 0; i < g.m; i++ {
		r := g.edgeVar[g.rowStart[i]:g.rowStart[i+1]]
		rmax = max(rmax, len(r))
		for _, v := range r {
			colRows[v] = append(colRows[v], i)
		}
	}
	cmax := 0
	for _, r := range colRows {
		cmax = max(cmax, len(r))
	}
	var b strings.Builder
	fmt.Fprintf(&b, "%d %d\n%d %d\n", g.n, g.m, cmax, rmax)
	for v, r := range colRows {
		if v > 0 {
			b.WriteByte(' ')
		}
		b.WriteString(strconv.Itoa(len(r)))
	}
	b.WriteByte('\n')
	for i := 0; i < g.m; i++ {
		if i > 0 {
			b.WriteByte(' ')
		}
		b.WriteString(strconv.Itoa(int(g.rowStart[i+1] - g.rowStart[i])))
	}
	b.WriteByte('\n')
	pad := func(xs []int, w int) {
		for j := 0; j < w; j++ {
			if j > 0 {
				b.WriteByte(' ')
			}
			x := 0
			if j < len(xs) {
				x = xs[j] + 1
			}
			b.WriteString(strconv.Itoa(x))
		}
		b.WriteByte('\n')
	}
	for _, r := range colRows {
		pad(r, cmax)
	}
	for i := 0; i < g.m; i++ {
		var xs []int
		for _, v := range g.edgeVar[g.rowStart[i]:g.rowStart[i+1]] {
			xs = append(xs, int(v))
		}
		pad(xs, rmax)
	}
	return b.String()
}
