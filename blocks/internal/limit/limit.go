// Package limit holds the bounds blocks put on the sizes a script gives them, so that a typo
// (source.Random(1<<40)) is refused at the script's line with the bound named, instead of
// exhausting the machine's memory when the first frame is made.
package limit

import "fmt"

// FrameBits is the most bits a frame may carry: 2^22 = 4 194 304. Every worker computes a whole
// frame at once, and a link holds tens of bytes per bit in its buffers (bits, complex128
// samples, several times over with oversampling), so a frame this long already takes a few
// hundred MiB per worker; longer frames gain nothing in speed. Codes of the trade stay far
// below (DVB-S2's longest LDPC block is 64 800 bits).
const FrameBits = 1 << 22

// Taps is the most taps an equaliser may have: 1024. Design cost grows with the square of the
// length; practical equalisers have from a few to a few hundred taps.
const Taps = 1 << 10

// Frame refuses a frame length above FrameBits: block and param name what the script typed.
func Frame(block, param string, n int) error {
	if n > FrameBits {
		return fmt.Errorf("%s: %s = %d bits per frame is above the limit of %d (2^22); split the data into more frames", block, param, n, FrameBits)
	}
	return nil
}

// Length refuses an equaliser length above Taps.
func Length(block string, n int) error {
	if n > Taps {
		return fmt.Errorf("%s: length %d is above the limit of %d taps", block, n, Taps)
	}
	return nil
}
