package source

import (
	"fmt"

	"tally/blocks/internal/limit"
	"tally/blocks/link"
	"tally/blocks/rng"
)

// RandomBits emits N independent equiprobable bits per frame, drawn from the frame's stream.
type RandomBits struct {
	N     int // bits per frame, ≥ 1
	buf   []byte
	exact bool // Exact: never rounded (framelen.go)
}

// Random is the usual data source: n random bits per frame.
func Random(n int) *RandomBits { return &RandomBits{N: n} }

// Name is "source.Random".
func (s *RandomBits) Name() string { return "source.Random" }

// Err reports a frame length below one bit or above limit.FrameBits.
func (s *RandomBits) Err() error {
	if s.N < 1 {
		return fmt.Errorf("source.Random: n = %d bits per frame must be at least 1", s.N)
	}
	return limit.Frame("source.Random", "n", s.N)
}

// Process fills the frame with fresh bits.
func (s *RandomBits) Process(f *link.Frame, r *rng.Stream) error {
	if err := s.Err(); err != nil {
		return err
	}
	s.buf = link.GrowBytes(s.buf, s.N)
	r.Bits(s.buf)
	emit(f, s.buf)
	return nil
}
