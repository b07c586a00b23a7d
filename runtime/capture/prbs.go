package capture

import (
	"fmt"
	"math/bits"
)

// PRBSOrders are the register lengths of the ITU-T O.150 sequences tally knows, as in
// tally/blocks/source (polynomial x^n + x^k + 1, k from prbsTaps).
var PRBSOrders = []int{7, 9, 11, 15, 20, 23, 29, 31}

// prbsTaps maps an order n to the k of its O.150 polynomial x^n + x^k + 1: the same table as
// tally/blocks/source, whose sequences a capture of tally's own source matches bit for bit.
var prbsTaps = map[int]int{7: 6, 9: 5, 11: 9, 15: 14, 20: 3, 23: 18, 29: 27, 31: 28}

// prbs is the O.150 sequence of an order as a pattern: a[t] = a[t−k] ⊕ a[t−n].
//
// Its generator makes 64 bits at once. The next 64 bits are a linear function over GF(2) of
// the n ≤ 31 bits before them, so they are the XOR of four table entries, one per byte of
// the register (tables built once by running the recurrence from each unit register); the
// new register is the last n of the 64 bits. Locking is self-synchronising: n received bits
// are taken as the register and the next lockBits bits are checked against what it predicts,
// for both polarities.
type prbs struct {
	n, k  uint
	mask  uint64 // n ones
	table [4][256]uint64
}

func newPRBS(order int) (*prbs, error) {
	k, ok := prbsTaps[order]
	if !ok {
		return nil, fmt.Errorf("PRBS order %d is not one of 7, 9, 11, 15, 20, 23, 29, 31", order)
	}
	p := &prbs{n: uint(order), k: uint(k), mask: 1<<uint(order) - 1}
	var unit [32]uint64 // the 64 bits that follow the register 1<<i
	for i := range p.n {
		unit[i] = p.slow(1<<i, 64)
	}
	for b := range 4 {
		for v := range 256 {
			var w uint64
			for j := range 8 {
				if v>>j&1 == 1 && uint(8*b+j) < p.n {
					w ^= unit[8*b+j]
				}
			}
			p.table[b][v] = w
		}
	}
	return p, nil
}

func (p *prbs) describe() string {
	return fmt.Sprintf("PRBS 2^%d−1 (ITU-T O.150, x^%d + x^%d + 1)", p.n, p.n, p.k)
}

// step is the register after one more bit, and that bit.
func (p *prbs) step(s uint64) (uint64, uint64) {
	b := (s ^ s>>(p.n-p.k)) & 1 // a[t] = a[t−n] ⊕ a[t−k]
	return s>>1 | b<<(p.n-1), b
}

// back is the register one bit earlier: a[t−n] = a[t] ⊕ a[t−k] for the last bit t.
func (p *prbs) back(s uint64) uint64 {
	b := (s>>(p.n-1) ^ s>>(p.n-1-p.k)) & 1
	return (s<<1 | b) & p.mask
}

// slow is the next m ≤ 64 bits after register s, one bit at a time (the tables' definition).
func (p *prbs) slow(s uint64, m uint) uint64 {
	var w uint64
	for i := range m {
		var b uint64
		s, b = p.step(s)
		w |= b << i
	}
	return w
}

// word is the next 64 bits after register s, and the register after them.
func (p *prbs) word(s uint64) (uint64, uint64) {
	w := p.table[0][s&0xff] ^ p.table[1][s>>8&0xff] ^ p.table[2][s>>16&0xff] ^ p.table[3][s>>24&0xff]
	return w, w >> (64 - p.n)
}

// at is the register at capture bit to, from the alignment's register.
func (p *prbs) at(a alignment, to int64) uint64 {
	s := a.state
	d := to - a.pos
	for ; d >= 64; d -= 64 {
		_, s = p.word(s)
	}
	for ; d > 0; d-- {
		s, _ = p.step(s)
	}
	for ; d < 0; d++ {
		s = p.back(s)
	}
	return s
}

func (p *prbs) lockSpan() (int64, int64) { return int64(p.n), lockBits }

func (p *prbs) tryLock(w *bitWindow, q int64, _ *alignment) (alignment, bool) {
	if !w.has(q-int64(p.n), q+lockBits) {
		return alignment{}, false
	}
	raw := w.get(q-int64(p.n), p.n)
	for _, inv := range []bool{false, true} {
		s := raw
		var flip uint64
		if inv {
			s ^= p.mask
			flip = ^uint64(0)
		}
		if s == 0 {
			continue // the register's lock-up state (constant bits), never part of the sequence
		}
		miss := 0
		r := s
		for i := int64(0); i < lockBits; i += 64 {
			var e uint64
			e, r = p.word(r)
			miss += bits.OnesCount64(e ^ flip ^ w.get(q+i, 64))
		}
		if miss <= lockSlack {
			return alignment{inv: inv, pos: q, state: s}, true
		}
	}
	return alignment{}, false
}

type prbsGen struct {
	p    *prbs
	s    uint64
	flip uint64
	pos  int64
}

func (g *prbsGen) next() uint64 {
	w, s := g.p.word(g.s)
	g.s = s
	g.pos += 64
	return w ^ g.flip
}

func (g *prbsGen) here() alignment {
	return alignment{inv: g.flip != 0, pos: g.pos, state: g.s}
}

func (p *prbs) expect(a alignment, pos int64) generator {
	g := &prbsGen{p: p, s: p.at(a, pos), pos: pos}
	if a.inv {
		g.flip = ^uint64(0)
	}
	return g
}

func (p *prbs) moved(a alignment, d int64) alignment {
	return alignment{inv: a.inv, pos: a.pos, state: p.at(a, a.pos+d)}
}

// maxShift bounds the slip a PRBS counter names in bits; a larger jump is reported as a loss
// of alignment of unknown size.
const maxShift = 4096

func (p *prbs) shift(a, b alignment, at int64) (int64, bool) {
	sa, sb := p.at(a, at), p.at(b, at)
	if sa == sb {
		return 0, true
	}
	fw, bw := sa, sa
	for d := int64(1); d <= maxShift; d++ {
		fw, _ = p.step(fw)
		bw = p.back(bw)
		switch sb {
		case fw:
			return d, true
		case bw:
			return -d, true
		}
	}
	return 0, false
}
