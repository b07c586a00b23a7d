package source

import (
	"fmt"

	"tally/blocks/internal/limit"
	"tally/blocks/link"
	"tally/blocks/rng"
)

// Repeat emits a fixed bit pattern over and over, N bits per frame. The pattern runs on across
// frames: frame f starts at bit (f·N) mod len(Bits) of the pattern.
type Repeat struct {
	Bits []byte // the pattern, one bit (0 or 1) per byte, not empty
	N    int    // bits per frame, ≥ 1
	buf  []byte
}

// Pattern repeats bits (0/1 per byte), n bits per frame. The pattern is copied.
func Pattern(bits []byte, n int) *Repeat {
	return &Repeat{Bits: append([]byte(nil), bits...), N: n}
}

// Name is "source.Pattern".
func (s *Repeat) Name() string { return "source.Pattern" }

// Err reports an empty pattern, a byte other than 0 or 1, or a frame below one bit.
func (s *Repeat) Err() error {
	if s.N < 1 {
		return fmt.Errorf("source.Pattern: n = %d bits per frame must be at least 1", s.N)
	}
	if err := limit.Frame("source.Pattern", "n", s.N); err != nil {
		return err
	}
	if len(s.Bits) == 0 {
		return fmt.Errorf("source.Pattern: the pattern is empty")
	}
	for i, b := range s.Bits {
		if b > 1 {
			return fmt.Errorf("source.Pattern: bit %d of the pattern is %d, not 0 or 1", i, b)
		}
	}
	return nil
}

// Process copies the frame's stretch of the endless pattern.
func (s *Repeat) Process(f *link.Frame, r *rng.Stream) error {
	if err := s.Err(); err != nil {
		return err
	}
	s.buf = link.GrowBytes(s.buf, s.N)
	p := len(s.Bits)
	off := int(mulMod(uint64(f.Index), uint64(s.N), uint64(p)))
	for i := 0; i < s.N; {
		c := copy(s.buf[i:], s.Bits[off:])
		i += c
		off = 0
	}
	emit(f, s.buf)
	return nil
}
