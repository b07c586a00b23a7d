package capture

import (
	"fmt"
	"io"
	"math/bits"
	"slices"
)

// reference is a known bit sequence read from a file, repeated cyclically: capture bit p
// expects reference bit (p + off) mod L. Locking finds the offsets whose next lockBits bits
// match the capture, in both polarities, through an index of the reference's 32-bit words
// at every bit offset.
type reference struct {
	name  string
	n     int64    // L, bits
	ext   []uint64 // the sequence repeated to at least L + 192 bits, so any 64 bits at j < L read in place
	index []uint64 // sorted: the 32 bits from j on (high half), j (low half), for every j < L
}

// maxRefBits bounds a reference file (1 MiB packed): it is held in memory with an index of
// 8 bytes a bit; the capture is not held.
const maxRefBits = 1 << 23

func readReference(name string, in io.Reader, f Format, lsb bool) (*reference, error) {
	rd := newBitReader(in, f, lsb)
	var words []uint64
	var n int64
	chunk := make([]uint64, 1<<13)
	for {
		nb, err := rd.read(chunk)
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
			return nil, fmt.Errorf("it holds more than %d bits (1 MiB packed), the most a reference may", int64(maxRefBits))
		}
	}
	if n == 0 {
		return nil, ErrEmpty
	}
	need := n + 192
	ext := make([]uint64, (need+63)/64)
	for i := int64(0); i < int64(len(ext))*64; i += 64 {
		ext[i/64] = getCyclic(words, n, i%n)
	}
	r := &reference{name: name, n: n, ext: ext, index: make([]uint64, n)}
	for j := range n {
		r.index[j] = uint64(uint32(r.at64(j)))<<32 | uint64(j)
	}
	slices.Sort(r.index)
	return r, nil
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
	return fmt.Sprintf("reference %s (%s bits, repeated)", r.name, grouped(r.n))
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

// tryLock looks up the capture's next 32 bits (and their complement) in the index and checks
// each place they occur over lockBits bits; among those that match it keeps the fewest
// mismatches, then the one nearest the hint (a periodic reference matches at several). An
// error among those 32 bits hides the place; the search then moves on to later bits.
func (r *reference) tryLock(w *bitWindow, q int64, hint *alignment) (alignment, bool) {
	if !w.has(q, q+lockBits) {
		return alignment{}, false
	}
	x0, x1 := w.get(q, 64), w.get(q+64, 64)
	best, bestMiss, bestDist := alignment{}, lockSlack+1, int64(-1)
	for _, inv := range []bool{false, true} {
		var flip uint64
		if inv {
			flip = ^uint64(0)
		}
		key := uint64(uint32(x0 ^ flip))
		i, _ := slices.BinarySearch(r.index, key<<32)
		for ; i < len(r.index) && r.index[i]>>32 == key; i++ {
			j := int64(r.index[i] & 0xffffffff)
			miss := bits.OnesCount64(r.at64(j)^x0^flip) + bits.OnesCount64(r.at64((j+64)%r.n)^x1^flip)
			if miss > lockSlack {
				continue
			}
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

func (r *reference) moved(a alignment, d int64) alignment {
	a.off = mod(a.off+d, r.n)
	return a
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
