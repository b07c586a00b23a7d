// Package source holds the blocks that start a link: they fill a frame's information bits,
// one bit per byte (0 or 1), and set Coded to the same slice for an uncoded link.
//
// Every source makes frame f of a point from f alone (and the frame's random stream), never
// from the frames before it, so frames can be computed on any worker in any order.
package source

import (
	"math/bits"

	"tally/blocks/link"
)

// emit points the frame's Bits and Coded at buf, the source's own buffer.
func emit(f *link.Frame, buf []byte) {
	f.Bits = buf
	f.Coded = buf
}

// mulMod is a·b mod m without overflow, for the offset of frame a of b bits in a sequence of
// period m.
func mulMod(a, b, m uint64) uint64 {
	hi, lo := bits.Mul64(a%m, b%m)
	_, r := bits.Div64(hi, lo, m) // hi < m since both factors are below m
	return r
}
