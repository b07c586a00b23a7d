package capture

// alignment is one way the expected pattern lines up with the capture, and its polarity.
//
// For a PRBS it is the register at capture bit pos: state holds the n pattern bits before pos
// (bit i is the bit expected at pos−n+i, before inversion). For a reference file it is the
// offset: capture bit p expects reference bit (p + off) mod the reference's length.
type alignment struct {
	inv   bool
	pos   int64
	state uint64
	off   int64
}

// pattern is what a capture is compared with.
type pattern interface {
	// describe names the pattern for people: "PRBS 2^23−1 (ITU-T O.150)".
	describe() string
	// tryLock looks for an alignment that matches the capture's bits from q on (reading bits
	// before q as well, when the pattern needs them); hint, when given, is preferred among
	// equally good ones. It returns false when none matches.
	tryLock(w *bitWindow, q int64, hint *alignment) (alignment, bool)
	// lockSpan is how many bits around q tryLock reads: before q and from q on.
	lockSpan() (before, after int64)
	// expect returns a generator of the expected words from capture bit pos on.
	expect(a alignment, pos int64) generator
	// moved is a moved by d bits: capture bit p expects what a expects at p + d.
	moved(a alignment, d int64) alignment
	// shift is how many bits b lies ahead of a (b − a), judged at capture bit at; false when
	// the two cannot be related within the search range.
	shift(a, b alignment, at int64) (int64, bool)
}

// generator gives the expected bits, 64 at a time, polarity applied.
type generator interface {
	next() uint64
	// here is the alignment at the generator's position (the next bit it will give).
	here() alignment
}

// lockBits is how many bits a candidate lock is checked over, and lockSlack how many of them
// may be in error: a wrong alignment agrees with about half of them, so 8 of 128 wrong
// accepts a true lock at any BER below about 1 % and a false one with probability near 1e-26.
const (
	lockBits  = 128
	lockSlack = 8
)

// bitWindow holds the capture bits [base, base + 64·len(words)) that the counter may still
// need to read back: a word-aligned stretch.
type bitWindow struct {
	base  int64 // capture bit of words[0] bit 0 (a multiple of 64)
	words []uint64
	end   int64 // capture bits held end here (the last word may be partial)
}

// get returns the k ≤ 64 bits from capture bit p on (bit i is capture bit p+i); p and p+k
// must lie within the window.
func (w *bitWindow) get(p int64, k uint) uint64 {
	off := p - w.base
	i, sh := off>>6, uint(off&63)
	v := w.words[i] >> sh
	if sh != 0 && int(i+1) < len(w.words) {
		v |= w.words[i+1] << (64 - sh)
	}
	if k < 64 {
		v &= 1<<k - 1
	}
	return v
}

// has reports whether bits [p, q) lie within the window.
func (w *bitWindow) has(p, q int64) bool { return p >= w.base && q <= w.end }

// drop forgets the words wholly before capture bit p.
func (w *bitWindow) drop(p int64) {
	n := int((p - w.base) >> 6)
	if n <= 0 {
		return
	}
	if n > len(w.words) {
		n = len(w.words)
	}
	k := copy(w.words, w.words[n:])
	w.words = w.words[:k]
	w.base += int64(n) * 64
}

// push appends a word holding nbits capture bits.
func (w *bitWindow) push(v uint64, nbits int64) {
	w.words = append(w.words, v)
	w.end = w.base + int64(len(w.words)-1)*64 + nbits
}
