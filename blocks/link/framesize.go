package link

import (
	"fmt"
	"slices"
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
func (l *Link) Fit() (from, to int, why string) { return FitTogether(l) }

// FitTogether is Fit for links that must send the same source bits in a frame (the variants of
// a paired comparison): the least length at least the script's that every one of them takes
// in whole units, set on all. Links whose sources differ in length, or any of which is Exact
// or of unknown length, are left as they were.
func FitTogether(links ...*Link) (from, to int, why string) {
	var sources []Sized
	for i, l := range links {
		if len(l.blocks) == 0 {
			return 0, 0, ""
		}
		s, ok := l.blocks[0].(Sized)
		if !ok {
			return 0, 0, ""
		}
		if i == 0 {
			from = s.FrameLen()
		}
		if s.FrameLenExact() || s.FrameLen() != from {
			return from, from, ""
		}
		sources = append(sources, s)
	}
	all := func(n int, units *[]string) bool {
		for _, l := range links {
			if !l.takes(n, units) {
				return false
			}
		}
		return true
	}
	if from < 1 || all(from, nil) {
		return from, from, ""
	}
	for n := from + 1; n <= from+maxFit; n++ {
		if all(n, nil) {
			var units []string
			all(n, &units)
			for _, s := range sources {
				s.SetFrameLen(n)
			}
			return from, n, strings.Join(units, ", ")
		}
	}
	return from, from, ""
}

// takes reports whether every block after the source that Fit knows takes n source bits in
// whole units; units, when not nil, gets the blocks that take more than one bit at a time.
func (l *Link) takes(n int, units *[]string) bool {
	for _, b := range l.blocks[1:] {
		f, ok := b.(Framed)
		if !ok {
			return true
		}
		u := f.FrameUnit()
		if units != nil && u > 1 {
			if w := fmt.Sprintf("%s takes %d bits at a time", NameOf(b), u); !slices.Contains(*units, w) {
				*units = append(*units, w)
			}
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
