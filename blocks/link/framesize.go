package link

import (
	"fmt"
	"strings"
)

// Framed is implemented by the blocks between the source and the modulator that take their
// input in whole units (a code's k bits, an interleaver's block, a modulator's bits per
// symbol). FrameUnit is the number of bits the frame entering the block must be a multiple
// of; FrameOut the number of bits leaving it for n entering, or −1 when what leaves is no
// longer bits (a modulator: the blocks after it follow from it).
type Framed interface {
	FrameUnit() int
	FrameOut(n int) int
}

// Sized is implemented by sources whose frame length can be rounded up to what the blocks
// after them take (Link.Fit): FrameLen is the bits per frame, SetFrameLen changes it, and
// FrameLenExact says the script asked for that length exactly (source.Random(n).Exact()).
type Sized interface {
	FrameLen() int
	SetFrameLen(n int)
	FrameLenExact() bool
}

// maxFit bounds the lengths Fit tries above the script's.
const maxFit = 1 << 16

// Fit rounds the source's frame length up to the least one that every block after it takes
// in whole units (the bits per symbol of the modulator, a code's block, an interleaver's
// size), following the bits from the source through the coders and interleavers to the
// modulator. It stops at the first block it does not know (a script's own block), since it
// cannot tell what that one does to the length. A source the script made Exact, a length that
// already fits, or no fitting length within 65 536 bits more, leave the link as it was (the
// run then meets the block's own message). It returns the old and new lengths (equal when
// nothing changed; 0 and 0 for a source of unknown length) and the blocks that asked for
// whole units, as text for the user.
func (l *Link) Fit() (from, to int, why string) {
	if len(l.blocks) == 0 {
		return 0, 0, ""
	}
	s, ok := l.blocks[0].(Sized)
	if !ok {
		return 0, 0, ""
	}
	from = s.FrameLen()
	if s.FrameLenExact() {
		return from, from, ""
	}
	var units []string
	fits := func(n int, note bool) bool {
		for _, b := range l.blocks[1:] {
			f, ok := b.(Framed)
			if !ok {
				return true
			}
			u := f.FrameUnit()
			if note && u > 1 {
				units = append(units, fmt.Sprintf("%s takes %d bits at a time", NameOf(b), u))
			}
			if u > 1 && n%u != 0 {
				return false
			}
			if n = f.FrameOut(n); n < 0 {
				return true
			}
		}
		return true
	}
	if from < 1 || fits(from, false) {
		return from, from, ""
	}
	for n := from + 1; n <= from+maxFit; n++ {
		if fits(n, false) {
			fits(n, true)
			s.SetFrameLen(n)
			return from, n, strings.Join(units, ", ")
		}
	}
	return from, from, ""
}
