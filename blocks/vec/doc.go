// Package vec holds compiled operations over a frame's buffers for the authors of custom
// blocks: a block written with them runs each operation at compiled speed, where a per-sample
// loop in a script runs in the interpreter, a hundred times slower.
//
// Every function works on whole slices and writes its result into a destination slice dst
// that the caller owns (usually a buffer kept in the block between frames, grown with
// link.GrowComplex or link.GrowFloats), so nothing allocates per frame:
//
//	vec.Mul(y, f.Samples, g)     // y[i] = f.Samples[i]·g[i]
//	vec.Clip(f.Samples, f.Samples, 1.5)
//
// Lengths: the inputs (masks included) must have the length of dst, and Dot's two arguments the
// same length; a function panics, naming itself and the lengths, when they do not.
//
// Aliasing: dst may be the very same slice as any input (same first element and length), so
// operations work in place; it must not overlap an input partly (dst = x[1:] of x), which gives
// an unspecified result. FIR may also be done in place.
//
// Names: complex samples ([]complex128) have the plain names; operations on real values
// ([]float64: LLRs, magnitudes, powers) end in Floats; masks are []byte, one per value (0 or
// not 0), as bits are in a frame.
package vec

import "fmt"

// check panics unless every slice in n has length want.
func check(op string, want int, n ...int) {
	for _, m := range n {
		if m != want {
			panic(fmt.Sprintf("vec.%s: an input has %d values, dst %d (they must be the same length)", op, m, want))
		}
	}
}
