package rng

import "math/rand/v2"

// rand returns a math/rand/v2 generator that draws from s, made once per stream, so the
// standard library's distributions (NormFloat64, ExpFloat64, Perm, …) can be used on it.
func (s *Stream) rand() *rand.Rand {
	if s.r == nil {
		s.r = rand.New(s)
	}
	return s.r
}

// Rand exposes the stream as a *math/rand/v2.Rand for distributions not offered here.
// Draws from it advance the stream.
func (s *Stream) Rand() *rand.Rand { return s.rand() }
