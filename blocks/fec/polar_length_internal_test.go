package fec

import (
	"math"
	"math/bits"
	"testing"
)

// The recursion of the construction and the algebra of the generator agree on which message
// positions the removed bits affect (see polar_length.go): with quasi-uniform puncturing of P
// bits the Gaussian approximation gives mean 0, no information, to exactly u_0 … u_{P−1}; and
// the shortened bits are 0 in every codeword, and the mean of a shortened u position is
// infinite. A recursion on the wrong halves of the word (even and odd positions instead of
// first and second half) fails both.
func TestPolarRemovedPositions(t *testing.T) {
	for _, n := range []int{5, 13, 100, 1000} {
		c := PolarPunctured(n, n/2)
		if err := c.Err(); err != nil {
			t.Fatal(err)
		}
		p := c.N - n
		mu := c.means(1)
		ch := make([]float64, c.N) // the mother code on the same channel, nothing removed
		for i := range ch {
			ch[i] = 4 * c.Rate() * math.Pow(10, 0.1)
		}
		mother := meansOf(ch)
		for i, m := range mu {
			// (Other channels lose by the puncturing too, and the approximation's φ exceeds 1
			// for small means, which it rounds to 0: only channels of some use in the mother
			// code are held to a positive mean.)
			if i < p && m != 0 || i >= p && m == 0 && mother[i] > 1 {
				t.Fatalf("punctured (%d of %d): u_%d has mean %v (mother code %v)", p, c.N, i, m, mother[i])
			}
		}
		for _, i := range c.info {
			if i < int32(p) {
				t.Fatalf("punctured: information position %d among the incapable ones", i)
			}
		}

		s := PolarShortened(n, n/2)
		mu = s.means(1)
		for i, m := range mu {
			if math.IsInf(m, 1) != (i >= s.N-p) {
				t.Fatalf("shortened: u_%d has mean %v", i, m)
			}
		}
		msg, x := make([]byte, s.K), make([]byte, s.N)
		for trial := 0; trial < 50; trial++ {
			for i := range msg {
				msg[i] = byte(bits.OnesCount(uint(i*trial+trial)) & 1)
			}
			msg[trial%len(msg)] ^= 1
			s.Encode(msg, x)
			for pos, r := range s.removed {
				if r == removedShortened && x[pos] != 0 {
					t.Fatalf("shortened (%d, %d): removed position %d is 1 in a codeword", n, s.K, pos)
				}
			}
		}
	}
	// A code of power-of-two length keeps the recursion of its own: the general one agrees.
	c := Polar(256, 128)
	ch := make([]float64, 256)
	for i := range ch {
		ch[i] = 4 * 0.5 * math.Pow(10, 0.2)
	}
	a, b := c.means(2), meansOf(ch)
	for i := range a {
		if math.Abs(a[i]-b[i]) > 1e-9*a[i] {
			t.Fatalf("u_%d: %v by doubling, %v by halves", i, a[i], b[i])
		}
	}
}
