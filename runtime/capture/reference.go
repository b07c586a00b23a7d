package capture

import (
	"fmt"
	"io"
	"math/bits"
)

// reference is a known bit sequence read from a file, repeated cyclically: capture bit p
// expects reference bit (p + off) mod L. Locking searches every offset for the one whose
// next lockBits bits match the capture, in both polarities.
type reference struct {
	name string
	n    int64    // L, bits
	ext  []uint64 // the sequence repeated to at least L + 192 bits, so any 64 bits at j < L read in place
}

// maxRefBits bounds a reference file (it is held in memory; the capture is not).
const maxRefBits = 1 << 33

func readReference(name string, in io.Reader, f Format, lsb bool) (*reference, error) {
	r := newBitReader(in, f, lsb)
	var words []uint64
	var n int64
	chunk := make([]uint64, 1<<13)
	for {
		nb, err := r.read(chunk)
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, err
		}
		if n%64 != 0 {
			return nil, fmt.Errorf("internal: partial word before the end")
		}
		words = append(words, chunk[:(nb+63)/64]...)
		n += nb
		if n > maxRefBits {
			return nil, fmt.Errorf("the reference holds more than %d bits", int64(maxRefBits))
		}
	}
	if n == 0 {
		return nil, &FormatError{0, "the reference is empty"}
	}
	need := n + 192
	ext := make([]uint64, (need+63)/64)
	for i := int64(0); i < int64(len(ext))*64; i += 64 {
		ext[i/64] = getCyclic(words, n, i%n)
	}
	return &reference{name: name, n: n, ext: ext}, nil
}

// getCyclic is the 64 bits of the cyclic sequence words (n bits) from bit j < n on.
func getCyclic(words []uint64, n, j int64) uint64 {
	var v uint64
	for i := uint(0); i < 64; {
		wi, sh := j>>6, uint(j&63)
		take := min(64-sh, uint(n-j), 64-i)
		chunk := words[wi] >> sh
		if take < 64 {
			chunk &= 1<<take - 1
		}
		v |= chunk << i
		i += take
		j += int64(take)
		if j == n {
			j = 0
		}
	}
	return v
}

func (r *reference) describe() string {
	return fmt.Sprintf("reference %s (%d bits, repeated)", r.name, r.n)
}

// at64 is the 64 reference bits from j on, 0 ≤ j < L.
func (r *reference) at64(j int64) uint64 {
	i, sh := j>>6, uint(j&63)
	v := r.ext[i] >> sh
	if sh != 0 {
		v |= r.ext[i+1] << (64 - sh)
	}
	return v
}

func (r *reference) lockSpan() (int64, int64) { return 0, lockBits }

// tryLock tries the offsets within maxShift of the hint first, then every offset; among
// those that match it keeps the fewest mismatches, then the one nearest the hint (a periodic
// reference matches at several).
func (r *reference) tryLock(w *bitWindow, q int64, hint *alignment) (alignment, bool) {
	if !w.has(q, q+lockBits) {
		return alignment{}, false
	}
	x0, x1 := w.get(q, 64), w.get(q+64, 64)
	if hint != nil && r.n > 2*maxShift+1 {
		if a, ok := r.scan(x0, x1, q, mod(q+hint.off-maxShift, r.n), 2*maxShift+1, hint); ok {
			return a, true
		}
	}
	return r.scan(x0, x1, q, 0, r.n, hint)
}

// scan tries count offsets, from the one that puts reference bit j0 at capture bit q on.
func (r *reference) scan(x0, x1 uint64, q, j0, count int64, hint *alignment) (alignment, bool) {
	best, bestMiss, bestDist := alignment{}, lockSlack+1, int64(-1)
	j := j0
	for range count { // j = (q + off) mod L
		d0 := bits.OnesCount64(r.at64(j) ^ x0)
		inv := d0 > 32
		if inv {
			d0 = 64 - d0
		}
		if d0 <= lockSlack {
			d1 := bits.OnesCount64(r.at64((j+64)%r.n) ^ x1)
			if inv {
				d1 = 64 - d1
			}
			if miss := d0 + d1; miss <= lockSlack {
				off := mod(j-q, r.n)
				dist := int64(0)
				if hint != nil {
					dist = abs64(symmetric(off-hint.off, r.n))
					if inv != hint.inv {
						dist += r.n
					}
				}
				if miss < bestMiss || miss == bestMiss && dist < bestDist {
					best, bestMiss, bestDist = alignment{inv: inv, pos: q, off: off}, miss, dist
				}
			}
		}
		if j++; j == r.n {
			j = 0
		}
	}
	return best, bestMiss <= lockSlack
}

type refGen struct {
	r    *reference
	j    int64
	flip uint64
	pos  int64
	off  int64
}

func (g *refGen) next() uint64 {
	v := g.r.at64(g.j)
	g.j += 64
	if g.j >= g.r.n {
		g.j %= g.r.n
	}
	g.pos += 64
	return v ^ g.flip
}

func (g *refGen) here() alignment { return alignment{inv: g.flip != 0, pos: g.pos, off: g.off} }

func (r *reference) expect(a alignment, pos int64) generator {
	g := &refGen{r: r, j: mod(pos+a.off, r.n), pos: pos, off: a.off}
	if a.inv {
		g.flip = ^uint64(0)
	}
	return g
}

func (r *reference) shift(a, b alignment, _ int64) (int64, bool) {
	return symmetric(b.off-a.off, r.n), true
}

func mod(a, n int64) int64 {
	a %= n
	if a < 0 {
		a += n
	}
	return a
}

// symmetric maps d mod n into (−n/2, n/2].
func symmetric(d, n int64) int64 {
	d = mod(d, n)
	if d > n/2 {
		d -= n
	}
	return d
}

func abs64(v int64) int64 {
	if v < 0 {
		return -v
	}
	return v
}
