package capture

import "math/bits"

// Row is one interval of the capture in table.csv: capture bits [Start, End).
type Row struct {
	Start, End int64
	Errors     int64
	Lost       int64 // bits not compared (before the first lock, or while the alignment was lost)
	Slips      int64 // alignment changes that begin in the row
}

// Bits is the number of bits the row compared.
func (r Row) Bits() int64 { return r.End - r.Start - r.Lost }

// maxRows bounds the rows kept: past it, neighbouring rows are merged in pairs and the
// interval doubles, so memory stays flat however long the capture.
const maxRows = 1 << 16

// rows counts errors, lost bits and slips per interval of the capture.
type rows struct {
	size int64
	done []Row // closed rows
	cur  Row
}

func newRows(size int64) *rows { return &rows{size: size, cur: Row{Start: 0, End: size}} }

// to closes every row that ends at or before capture bit p.
func (t *rows) to(p int64) {
	for p >= t.cur.End {
		t.done = append(t.done, t.cur)
		t.cur = Row{Start: t.cur.End, End: t.cur.End + t.size}
		if len(t.done) == maxRows {
			t.merge()
		}
	}
}

func (t *rows) merge() {
	half := t.done[:0]
	for i := 0; i+1 < len(t.done); i += 2 {
		a, b := t.done[i], t.done[i+1]
		half = append(half, Row{Start: a.Start, End: b.End, Errors: a.Errors + b.Errors, Lost: a.Lost + b.Lost, Slips: a.Slips + b.Slips})
	}
	t.done = half
	t.size *= 2
	t.cur.End = t.cur.Start + t.size
}

func (t *rows) addError(p int64) { t.to(p); t.cur.Errors++ }

func (t *rows) addSlip(p int64) { t.to(p); t.cur.Slips++ }

func (t *rows) addLost(p, n int64) {
	for n > 0 {
		t.to(p)
		k := min(n, t.cur.End-p)
		t.cur.Lost += k
		p += k
		n -= k
	}
}

// finish closes the rows up to the end of the capture; the last may be shorter.
func (t *rows) finish(end int64) []Row {
	if end > 0 {
		t.to(end - 1)
	}
	out := t.done
	if t.cur.Start < end {
		c := t.cur
		c.End = end
		out = append(out, c)
	}
	return out
}

// sink receives, in capture order, what the counter decided about every bit: compared
// (errors given by a mask), not compared (lost), and where the alignment changed.
type sink struct {
	errors, lost, before int64
	rows                 *rows
	bursts               *bursts
	clock                *clock // nil without a line rate
	blocks               *blockCount
	slips                []Slip
	slipCount            int64
}

// maxSlipsKept bounds the slips listed one by one (all are counted).
const maxSlipsKept = 10000

// mask records the compared bits [p, p+n) with error mask m (bit i: bit p+i in error).
func (s *sink) mask(p int64, m uint64, n uint) {
	if n < 64 {
		m &= 1<<n - 1
	}
	for m != 0 {
		i := bits.TrailingZeros64(m)
		m &= m - 1
		s.error(p + int64(i))
	}
}

func (s *sink) error(p int64) {
	s.errors++
	s.rows.addError(p)
	s.bursts.add(p)
	if s.blocks != nil {
		s.blocks.addError(p)
	}
	if s.clock != nil {
		s.clock.addError(p)
	}
}

// notCompared records bits [p, p+n) as not compared; beforeLock says they precede the first
// lock.
func (s *sink) notCompared(p, n int64, beforeLock bool) {
	if n <= 0 {
		return
	}
	if beforeLock {
		s.before += n
	} else {
		s.lost += n
	}
	s.rows.addLost(p, n)
	s.bursts.interrupt(p + n)
	if s.blocks != nil {
		s.blocks.addLost(p, n)
	}
	if s.clock != nil {
		s.clock.addLost(p, n)
	}
}

func (s *sink) slip(sl Slip) {
	s.slipCount++
	if len(s.slips) < maxSlipsKept {
		s.slips = append(s.slips, sl)
	}
	s.rows.addSlip(sl.Bit)
	if s.clock != nil {
		s.clock.addDefect(sl.Bit)
	}
}
