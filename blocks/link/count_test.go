package link_test

import (
	"testing"

	"tally/blocks/link"
	"tally/blocks/rng"
)

// CountErrors against the definition, a byte-by-byte comparison, for every length around the
// word and step sizes and for unequal lengths (the shorter one counts).
func TestCountErrors(t *testing.T) {
	s := rng.New(3)
	for n := range 100 {
		a, b := make([]byte, n), make([]byte, n+s.IntN(3))
		s.Bits(a)
		s.Bits(b)
		var want int64
		for i := range a {
			if a[i] != b[i] {
				want++
			}
		}
		if got := link.CountErrors(a, b); got != want {
			t.Fatalf("n = %d: %d errors, want %d", n, got, want)
		}
		if got := link.CountErrors(b, a); got != want {
			t.Fatalf("n = %d, swapped: %d errors, want %d", n, got, want)
		}
	}
}

func BenchmarkCountErrors(b *testing.B) {
	x, y := make([]byte, 8192), make([]byte, 8192)
	s := rng.New(1)
	s.Bits(x)
	s.Bits(y)
	b.SetBytes(8192)
	for b.Loop() {
		link.CountErrors(x, y)
	}
}
