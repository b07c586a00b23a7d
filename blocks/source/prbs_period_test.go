package source

import "testing"

func TestPRBSPeriodByJumping(t *testing.T) {
	// The period of the recurrence is the order of x modulo its characteristic polynomial q:
	// it is 2^n − 1 (q primitive) iff x^(2^n−1) ≡ 1 and x^((2^n−1)/p) ≢ 1 for every prime p
	// dividing 2^n − 1 (Lidl and Niederreiter, Finite Fields, 1997, ch. 3). Prime factors of
	// 2^n − 1 from the Cunningham tables (from memory), checked here by multiplying out.
	factors := map[int][]uint64{
		7:  {127},
		9:  {7, 73},
		11: {23, 89},
		15: {7, 31, 151},
		20: {3, 5, 11, 31, 41},
		23: {47, 178481},
		29: {233, 1103, 2089},
		31: {2147483647},
	}
	for n, ps := range factors {
		P := uint64(1)<<n - 1
		prod := uint64(1)
		for _, p := range ps {
			for r := P; r%p == 0; r /= p {
				prod *= p
			}
		}
		if prod != P {
			t.Fatalf("order %d: the factors %v do not make up 2^n − 1", n, ps)
		}
		s := PRBS(n, 1)
		q := uint64(1)<<n | uint64(1)<<(n-s.tap) | 1
		if got := polyPowX(P, q, uint(n)); got != 1 {
			t.Errorf("order %d: x^(2^n−1) mod q = %#x, not 1", n, got)
		}
		for _, p := range ps {
			if polyPowX(P/p, q, uint(n)) == 1 {
				t.Errorf("order %d: x^((2^n−1)/%d) ≡ 1, the period is shorter", n, p)
			}
		}
	}
}
