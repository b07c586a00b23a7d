package capture

import (
	"math"
	"math/bits"
)

// Burst definition. Errors less than Guard error-free bits apart belong to one burst: a burst
// begins with an error, ends with the error after which Guard bits in a row are correct, and
// its length counts the bits from its first error to its last, both included. An isolated
// error is a burst of length 1. This is the usual guard-space definition of a burst (common
// practice, no source); the guard is the one choice in it, stated with every report.
//
// The error-free gap between two consecutive errors is the number of correct bits between
// them. For independent errors at rate p the gaps are geometric, P(gap ≥ g) = (1−p)^g, so
// the share of gaps shorter than the guard would be 1 − (1−p)^Guard; a larger share is the
// signature of bursts. A stretch of bits not compared (a loss of alignment) ends a burst,
// and no gap is measured across it.
type bursts struct {
	guard int64

	open        bool
	start, last int64
	errs        int64

	Count                             int64     // bursts
	Errors                            int64     // errors in them (all errors)
	LengthSum                         int64     // Σ lengths
	MaxLength                         int64     // longest burst
	MaxStart                          int64     // where the longest began
	MaxErrors                         int64     // errors in the longest
	MostErrors, MostStart, MostLength int64     // the burst with the most errors
	Multi                             int64     // bursts of two or more errors
	Lengths                           [64]int64 // bursts by length: [b] holds lengths 2^b … 2^(b+1)−1

	prev      int64 // last error, −1 after a gap in the comparison
	Gaps      int64 // gaps measured
	GapSum    float64
	ShortGaps int64     // gaps shorter than the guard
	GapHist   [64]int64 // gaps by length g: [b] holds g+1 in 2^b … 2^(b+1)−1
}

func newBursts(guard int64) *bursts { return &bursts{guard: guard, prev: -1} }

func (b *bursts) add(p int64) {
	if b.prev >= 0 {
		g := p - b.prev - 1
		b.Gaps++
		b.GapSum += float64(g)
		b.GapHist[bits.Len64(uint64(g+1))-1]++
		if g < b.guard {
			b.ShortGaps++
		}
	}
	b.prev = p
	if b.open && p-b.last-1 < b.guard {
		b.last = p
		b.errs++
		return
	}
	b.close()
	b.open, b.start, b.last, b.errs = true, p, p, 1
}

func (b *bursts) close() {
	if !b.open {
		return
	}
	b.open = false
	n := b.last - b.start + 1
	b.Count++
	b.Errors += b.errs
	b.LengthSum += n
	if b.errs > 1 {
		b.Multi++
	}
	if n > b.MaxLength {
		b.MaxLength, b.MaxStart, b.MaxErrors = n, b.start, b.errs
	}
	if b.errs > b.MostErrors {
		b.MostErrors, b.MostStart, b.MostLength = b.errs, b.start, n
	}
	b.Lengths[bits.Len64(uint64(n))-1]++
}

// interrupt ends the burst in progress at a stretch not compared that ends at bit p.
func (b *bursts) interrupt(int64) {
	b.close()
	b.prev = -1
}

func (b *bursts) finish() { b.close() }

// expectedShort is the share of gaps shorter than the guard that independent errors at rate p
// would give, 1 − (1−p)^guard.
func expectedShort(p float64, guard int64) float64 {
	return -math.Expm1(float64(guard) * math.Log1p(-p))
}
