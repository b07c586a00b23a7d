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

// Options say what a capture holds and how to count it.
type Options struct {
	Name   string // the capture's name in reports (a file name, or "-")
	Format Format
	LSB    bool // packed bytes carry their first bit in the least significant place

	PRBS    int    // O.150 order, or 0 with a reference
	RefName string // the reference file's name
	Ref     io.Reader

	Interval int64 // bits per row of table.csv (0: one second with Rate, else 2^20)
	Rate     int64 // line rate in bit/s (0: no time-based figures)
	Block    int64 // G.826 block size in bits (0: no block figures)
	Guard    int64 // burst guard in bits (0: DefaultGuard)

	// Loss of alignment: Threshold or more errors among the last Window bits (0: defaults).
	Window    int64
	Threshold int64
}

// Defaults of Options.
const (
	DefaultGuard     = 64
	DefaultWindow    = 1024
	DefaultThreshold = 128 // an error ratio of 1/8 over the window
	defaultInterval  = 1 << 20
)

// Slip is a change of alignment between the pattern and the capture.
type Slip struct {
	Bit      int64 `json:"bit"`       // first capture bit not compared against the old alignment
	Lost     int64 `json:"lost_bits"` // bits from there compared with neither alignment
	Shift    int64 `json:"shift"`     // bits the pattern moved: +1 a bit missing from the capture, −1 a bit repeated
	Known    bool  `json:"shift_known"`
	Spread   int64 `json:"spread"` // bits over which the change could lie equally well (the bits agree with both)
	Inverted bool  `json:"inverted"`
	Polarity bool  `json:"polarity_changed"`
	Regained bool  `json:"regained"` // false: not regained before the end of the capture
}

// Counts is what counting a capture found, before any statistics.
type Counts struct {
	Name      string
	SHA256    string
	Bytes     int64
	Format    Format
	LSB       bool
	Pattern   string
	PRBS      int
	RefName   string
	RefSHA256 string
	RefBits   int64
	Offset    int64 // reference bit aligned with the capture's first bit at the first lock
	Bits      int64 // capture bits
	Compared  int64
	Errors    int64
	Lost      int64 // bits not compared after the first lock
	Before    int64 // bits before the first lock, not compared
	LockBit   int64 // first bit compared
	Inverted  bool  // the pattern was received inverted at the first lock
	Slips     []Slip
	NSlips    int64
	Rows      []Row
	Interval  int64 // bits a row (the last may be shorter)
	Bursts    *bursts
	Guard     int64
	Window    int64
	Thresh    int64
	Rate      int64
	Block     int64
	G821      *G821
	G826      *G826
	Blocks    int64 // whole blocks (with a block size)
	EBlocks   int64 // errored blocks among them
}

// RefError is a reference file that cannot serve.
type RefError struct {
	Name string
	Err  error
}

func (e *RefError) Error() string {
	if errors.Is(e.Err, ErrEmpty) {
		return fmt.Sprintf("reference %s: it holds no bits", e.Name)
	}
	return fmt.Sprintf("reference %s: %v", e.Name, e.Err)
}

func (e *RefError) Unwrap() error { return e.Err }

// ErrEmpty and ErrNoLock are the two ways a capture can hold nothing to count.
var (
	ErrEmpty  = errors.New("the capture holds no bits")
	ErrNoLock = errors.New("the pattern was not found in the capture")
)

// NoLockError says how far the search for the pattern went.
type NoLockError struct {
	Bits  int64
	Bytes int64
	Need  int64 // the fewest bits a lock can be found in
}

func (e *NoLockError) Error() string {
	return fmt.Sprintf("the pattern was not found in %d bits (%d bytes)", e.Bits, e.Bytes)
}

func (e *NoLockError) Unwrap() error { return ErrNoLock }

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

// wordSource hands out the capture's words, 64 bits each except a final partial one.
type wordSource struct {
	rd    *bitReader
	buf   []uint64
	i, n  int   // unread words buf[i:n]
	pos   int64 // capture bit of buf[i]
	eof   bool
	total int64 // capture bits, once eof
}

func (s *wordSource) fill() error {
	if s.i < s.n || s.eof {
		return nil
	}
	nb, err := s.rd.read(s.buf[:cap(s.buf)])
	s.buf = s.buf[:cap(s.buf)]
	s.i, s.n = 0, 0
	if err == io.EOF {
		s.eof, s.total = true, s.pos
		return nil
	}
	if err != nil {
		return err
	}
	s.n = int((nb + 63) / 64)
	if nb < int64(len(s.buf))*64 {
		s.eof, s.total = true, s.pos+nb
	}
	return nil
}

// limit is the end of the capture if known, else a bound beyond every word read.
func (s *wordSource) limit() int64 {
	if s.eof {
		return s.total
	}
	return 1<<62 - 1
}

// word hands out one word and its number of bits; ok is false at the end.
func (s *wordSource) word() (v uint64, nbits int64, ok bool, err error) {
	if err := s.fill(); err != nil {
		return 0, 0, false, err
	}
	if s.i == s.n {
		return 0, 0, false, nil
	}
	v = s.buf[s.i]
	nbits = min(64, s.limit()-s.pos)
	s.i++
	s.pos += 64
	return v, nbits, true, nil
}

// unread puts words back in front of the unread ones; the first starts at capture bit p.
func (s *wordSource) unread(words []uint64, p int64) {
	rest := s.buf[s.i:s.n]
	nb := make([]uint64, 0, max(len(words)+len(rest), 1<<13))
	nb = append(nb, words...)
	nb = append(nb, rest...)
	s.buf, s.i, s.n, s.pos = nb, 0, len(nb), p
}
