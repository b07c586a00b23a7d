package capture

import (
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"hash"
	"io"
	"math/bits"
)

// Count reads a capture to its end and counts it. Its memory does not depend on the
// capture's length (the reference, when one is used, is held whole).
func Count(in io.Reader, o Options) (*Counts, error) {
	if o.Guard <= 0 {
		o.Guard = DefaultGuard
	}
	if o.Window <= 0 {
		o.Window = DefaultWindow
	}
	if o.Threshold <= 0 {
		o.Threshold = DefaultThreshold
	}
	if o.Interval <= 0 {
		o.Interval = defaultInterval
		if o.Rate > 0 {
			o.Interval = o.Rate
		}
	}
	if o.Block > 0 && o.Rate > 0 && o.Rate%o.Block != 0 {
		return nil, fmt.Errorf("a second of %d bits does not hold a whole number of %d-bit blocks", o.Rate, o.Block)
	}
	var pat pattern
	res := &Counts{Name: o.Name, Format: o.Format, LSB: o.LSB, PRBS: o.PRBS, RefName: o.RefName, Guard: o.Guard,
		Window: o.Window, Thresh: o.Threshold, Rate: o.Rate, Block: o.Block}
	if o.Ref != nil {
		rh := sha256.New()
		ref, err := readReference(o.RefName, io.TeeReader(o.Ref, rh), o.Format, o.LSB)
		if err != nil {
			return nil, &RefError{Name: o.RefName, Err: err}
		}
		pat = ref
		res.RefSHA256 = hex.EncodeToString(rh.Sum(nil))
		res.RefBits = ref.n
	} else {
		p, err := newPRBS(o.PRBS)
		if err != nil {
			return nil, err
		}
		pat = p
	}
	res.Pattern = pat.describe()
	h := sha256.New()
	rd := newBitReader(io.TeeReader(in, h), o.Format, o.LSB)
	c := newCounter(pat, rd, o)
	if err := c.run(); err != nil {
		var fe *FormatError
		var re *RefError
		if errors.As(err, &fe) || errors.As(err, &re) || errors.Is(err, ErrNoLock) || errors.Is(err, ErrEmpty) {
			return nil, err
		}
		return nil, fmt.Errorf("reading the capture: %w", err)
	}
	c.finish(res, h)
	return res, nil
}

// counter compares a capture with a pattern, watching for loss of alignment.
type counter struct {
	pat pattern
	src *wordSource
	out *sink
	o   Options

	// locked: the generator of the expected bits, and the last Window bits (ring) whose errors
	// are not yet committed, so that a loss of alignment can take them back.
	gen    generator
	ring   []uint64 // received words
	rmask  []uint64 // their error masks
	wmask  int64    // len(ring) − 1 (a power of two)
	filled int64
	sum    int64 // errors in the ring

	locked bool
	ever   bool // locked at least once
	first  alignment
}

func newCounter(pat pattern, rd *bitReader, o Options) *counter {
	w := int64(1)
	for w*64 < o.Window {
		w *= 2
	}
	out := &sink{rows: newRows(o.Interval), bursts: newBursts(o.Guard)}
	if o.Block > 0 {
		out.blocks = newBlockCount(o.Block)
	}
	if o.Rate > 0 {
		out.clock = newClock(o.Rate, o.Block)
	}
	return &counter{pat: pat, src: &wordSource{rd: rd, buf: make([]uint64, 1<<13)}, out: out, o: o,
		ring: make([]uint64, w), rmask: make([]uint64, w), wmask: w - 1}
}

func (c *counter) run() error {
	win := &bitWindow{}
	for {
		if !c.locked {
			done, err := c.hunt(win, nil, nil)
			if err != nil || done {
				return err
			}
			continue
		}
		lost, err := c.follow()
		if err != nil {
			return err
		}
		if !lost {
			c.flushRing()
			return nil
		}
		win, old, exp := c.takeRing()
		done, err := c.hunt(win, &old, exp)
		if err != nil || done {
			return err
		}
	}
}

// follow compares words while the alignment holds. It returns lost = true when the errors in
// the ring reach the threshold, false at the end of the capture.
func (c *counter) follow() (lost bool, err error) {
	s := c.src
	ring, rmask, wm := c.ring, c.rmask, c.wmask
	w := int64(len(ring))
	for {
		if s.i == s.n {
			if err := s.fill(); err != nil {
				return false, err
			}
			if s.i == s.n {
				return false, nil
			}
		}
		words := s.buf[s.i:s.n]
		pos := s.pos
		last := -1 // index of a final partial word
		if s.eof && s.total%64 != 0 && pos+int64(len(words))*64 > s.total {
			last = len(words) - 1
		}
		for k, r := range words {
			m := r ^ c.gen.next()
			if k == last {
				m &= 1<<uint(s.total%64) - 1
			}
			slot := (pos >> 6) & wm
			if c.filled == w {
				if om := rmask[slot]; om != 0 {
					c.sum -= int64(bits.OnesCount64(om))
					c.out.mask(pos-w*64, om, 64)
				}
			} else {
				c.filled++
			}
			ring[slot], rmask[slot] = r, m
			pos += 64
			if m != 0 {
				c.sum += int64(bits.OnesCount64(m))
				if c.sum >= c.o.Threshold {
					s.i += k + 1
					s.pos = pos
					return true, nil
				}
			}
		}
		s.i = s.n
		s.pos = pos
	}
}

// flushRing commits the ring at the end of the capture.
func (c *counter) flushRing() {
	start := c.src.pos - c.filled*64
	for p := start; p < c.src.pos; p += 64 {
		if m := c.rmask[(p>>6)&c.wmask]; m != 0 {
			c.out.mask(p, m, 64)
		}
	}
	c.filled, c.sum = 0, 0
}

// takeRing turns the ring into a window of received bits with the old alignment's expected
// words beside them, for the search after a loss of alignment.
func (c *counter) takeRing() (*bitWindow, alignment, []uint64) {
	end := c.src.pos
	start := end - c.filled*64
	win := &bitWindow{base: start}
	var exp []uint64
	for p := start; p < end; p += 64 {
		slot := (p >> 6) & c.wmask
		win.words = append(win.words, c.ring[slot])
		exp = append(exp, c.ring[slot]^c.rmask[slot])
	}
	win.end = min(end, c.src.limit())
	c.filled, c.sum = 0, 0
	c.locked = false
	return win, c.gen.here(), exp
}

// maxHunt bounds the window searched for a lock (words): past it the oldest bits are given up
// as lost, so memory stays bounded during a long loss.
const maxHunt = 1 << 11

// hunt searches the capture from the window on for an alignment, then decides which bits
// belong to the old one (when there is one), which to the new, and which to neither. It
// returns done at the end of the capture.
func (c *counter) hunt(win *bitWindow, old *alignment, exp []uint64) (done bool, err error) {
	before, after := c.pat.lockSpan()
	var oldGen generator
	if old != nil {
		oldGen = c.pat.expect(*old, old.pos)
	}
	q := max(win.end, win.base+before)
	hop := int64(8)
	if _, ok := c.pat.(*reference); ok {
		hop = 64
	}
	for {
		for win.end < q+after {
			v, nb, ok, err := c.src.word()
			if err != nil {
				return false, err
			}
			if !ok {
				return true, c.endHunt(win, old, exp)
			}
			win.push(v, nb)
			if old != nil {
				exp = append(exp, oldGen.next())
			}
		}
		if a, ok := c.pat.tryLock(win, q, old); ok {
			return false, c.lock(win, old, exp, a, q)
		}
		q += hop
		if len(win.words) > maxHunt {
			keep := win.base + int64(len(win.words)-maxHunt/2)*64
			if old != nil {
				if c.giveUp(win, exp) {
					old, exp = nil, nil
				} else {
					exp = exp[:0]
					here := oldGen.here() // the old alignment, at the window's new start
					old = &here
				}
			} else {
				c.out.notCompared(win.base, keep-win.base, !c.ever)
				c.addToLoss(keep - win.base)
				win.drop(keep)
			}
			q = max(q, win.base+before)
		}
	}
}

// giveUp settles a search that went on past maxHunt. When the old alignment still fits the
// window (fewer errors than a quarter of its bits: a long stretch of errors, not a change of
// alignment) the window is counted against it and the search goes on with it; otherwise the
// window is split between the old alignment and lost bits, and the search goes on without it
// (given up: true). Either way the window is emptied.
func (c *counter) giveUp(win *bitWindow, exp []uint64) (givenUp bool) {
	oldErr := xorWords(win.words, exp)
	n := win.end - win.base
	if 4*int64(popcount(oldErr)) < n {
		commitBits(c.out, oldErr, win.base, 0, n)
	} else {
		c.resolveEnd(win, exp, win.end)
		givenUp = true
	}
	win.words, win.base = win.words[:0], win.end // the window holds whole words here
	return givenUp
}

// addToLoss adds n lost bits to a loss of alignment still in progress (given up, not
// regained).
func (c *counter) addToLoss(n int64) {
	if k := len(c.out.slips); c.ever && k > 0 && int64(k) == c.out.slipCount && !c.out.slips[k-1].Regained {
		c.out.slips[k-1].Lost += n
	}
}

// endHunt settles the window at the end of the capture.
func (c *counter) endHunt(win *bitWindow, old *alignment, exp []uint64) error {
	if old != nil {
		c.resolveEnd(win, exp, win.end)
		return nil
	}
	if !c.ever {
		if c.src.total == 0 {
			return ErrEmpty
		}
		before, after := c.pat.lockSpan()
		return &NoLockError{Bits: c.src.total, Bytes: c.src.rd.offset, Need: before + after}
	}
	c.out.notCompared(win.base, win.end-win.base, false)
	c.addToLoss(win.end - win.base)
	return nil
}

// resolveEnd splits the window [base, end) between the old alignment and bits lost for good
// (no new alignment was found).
func (c *counter) resolveEnd(win *bitWindow, exp []uint64, end int64) {
	rx := win.words
	old := xorWords(rx, exp)
	n := int(end - win.base)
	s1, _, _, _ := cut(old, nil, n)
	commitBits(c.out, old, win.base, 0, int64(s1))
	if int64(s1) < int64(n) {
		c.out.notCompared(win.base+int64(s1), int64(n-s1), false)
		c.out.slip(Slip{Bit: win.base + int64(s1), Lost: int64(n - s1)})
	}
}

// lock settles the window once the pattern is found at q with alignment a.
func (c *counter) lock(win *bitWindow, old *alignment, exp []uint64, a alignment, q int64) error {
	_, after := c.pat.lockSpan()
	// The region ends on the last word boundary within the bits the lock was checked on (the
	// bits after it may hold the next slip: they go through follow).
	end := (q + after) &^ 63
	for win.end < end {
		v, nb, ok, err := c.src.word()
		if err != nil {
			return err
		}
		if !ok {
			break
		}
		win.push(v, nb)
		if old != nil && len(exp) < len(win.words) {
			g := c.pat.expect(*old, win.base+int64(len(exp))*64)
			for len(exp) < len(win.words) {
				exp = append(exp, g.next())
			}
		}
	}
	end = min(end, win.end)
	nw := int((end - win.base + 63) / 64)
	rx := win.words[:nw]
	g := c.pat.expect(a, win.base)
	newErr := make([]uint64, nw)
	for i := range newErr {
		newErr[i] = rx[i] ^ g.next()
	}
	n := int(end - win.base)
	resume := n // bits of the region committed here; the rest goes back through follow
	// after the split to the new alignment: the next word boundary (a following slip, even
	// within the bits the lock was checked on, is then seen by follow)
	after1 := func(s2 int) int { return min(n, (s2+64)&^63) }
	switch {
	case old == nil:
		_, s2, _, _ := cut(nil, newErr, n)
		resume = after1(s2)
		c.out.notCompared(win.base, int64(s2), !c.ever)
		if c.ever {
			// the loss was given up earlier: the slip it began is now regained
			c.addToLoss(int64(s2))
			if k := len(c.out.slips); k > 0 && int64(k) == c.out.slipCount && !c.out.slips[k-1].Regained {
				c.out.slips[k-1].Regained = true
				c.out.slips[k-1].Inverted = a.inv
			}
		} else {
			c.ever = true
			c.first = c.pat.expect(a, win.base+int64(s2)).here()
		}
		commitBits(c.out, newErr, win.base, int64(s2), int64(resume))
	default:
		oldErr := xorWords(rx, exp[:nw])
		d, known := c.pat.shift(*old, a, q)
		if known && d == 0 && old.inv == a.inv {
			// The same alignment: a burst of errors, or two slips that cancel.
			if c.twoSlips(win.base, rx, oldErr, *old, n) {
				a = *old
				break
			}
			commitBits(c.out, oldErr, win.base, 0, int64(n))
			a = *old
			break
		}
		s1, s2, lo, hi := cut(oldErr, newErr, n)
		resume = after1(s2)
		commitBits(c.out, oldErr, win.base, 0, int64(s1))
		c.out.notCompared(win.base+int64(s1), int64(s2-s1), false)
		c.out.slip(Slip{Bit: win.base + int64(s1), Lost: int64(s2 - s1), Shift: d, Known: known, Spread: int64(hi - lo),
			Inverted: a.inv, Polarity: a.inv != old.inv, Regained: true})
		commitBits(c.out, newErr, win.base, int64(s2), int64(resume))
	}
	end = win.base + int64(resume)
	// Resume following from end; bits of the window past it go back to the source.
	c.gen = c.pat.expect(a, end)
	c.locked = true
	if end < win.end {
		k := int((end - win.base) / 64)
		c.src.unread(win.words[k:], end)
	}
	win.words, win.base, win.end = win.words[:0], 0, 0
	return nil
}

func xorWords(a, b []uint64) []uint64 {
	out := make([]uint64, len(a))
	for i := range a {
		out[i] = a[i] ^ b[i]
	}
	return out
}

// commitBits records the compared bits [base+from, base+to) whose error masks are m (word i
// covers base+64i …).
func commitBits(s *sink, m []uint64, base, from, to int64) {
	for p := from; p < to; {
		i := p / 64
		w := m[i] >> uint(p%64)
		n := min(64-p%64, to-p)
		if n < 64 {
			w &= 1<<uint(n) - 1
		}
		if w != 0 {
			s.mask(base+p, w, 64)
		}
		p += n
	}
}

func (c *counter) finish(res *Counts, h hash.Hash) {
	total := c.src.total
	out := c.out
	out.bursts.finish()
	res.SHA256 = hex.EncodeToString(h.Sum(nil))
	res.Bytes = c.src.rd.offset
	res.Bits = total
	res.Errors = out.errors
	res.Lost = out.lost
	res.Before = out.before
	res.Compared = total - out.lost - out.before
	res.LockBit = out.before
	res.Inverted = c.first.inv
	res.Offset = c.first.off
	if res.RefName != "" {
		res.Offset = mod(c.first.off, c.pat.(*reference).n)
	}
	res.Slips = out.slips
	if res.Slips == nil {
		res.Slips = []Slip{}
	}
	res.NSlips = out.slipCount
	res.Rows = out.rows.finish(total)
	res.Interval = out.rows.size
	res.Bursts = out.bursts
	if out.clock != nil {
		out.clock.finish(total)
		res.G821 = out.clock.g821
		res.G826 = out.clock.g826
	}
	if out.blocks != nil {
		res.Blocks, res.EBlocks = out.blocks.finish(total)
	}
}
