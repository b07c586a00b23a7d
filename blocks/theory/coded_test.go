package theory_test

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"

	"tally/blocks/theory"
)

func TestHammingWeights(t *testing.T) {
	// (7,4): A = 1, 0, 0, 7, 7, 0, 0, 1 (Lin and Costello, Error Control Coding, 2nd ed., 2004,
	// §4.1, from memory). For every length: the weights sum to 2^k, A_w = A_(n−w) (the all-ones
	// word is a codeword) and A_3 = n(n − 1)/6 (each pair of columns of H sums to a third one)
	// (common practice, no source).
	want := []float64{1, 0, 0, 7, 7, 0, 0, 1}
	a := theory.HammingWeights(3)
	for w := range want {
		if a[w] != want[w] {
			t.Errorf("(7,4): A_%d = %v, want %v", w, a[w], want[w])
		}
	}
	for m := 2; m <= 8; m++ {
		a := theory.HammingWeights(m)
		n := 1<<m - 1
		sum := 0.0
		tol := 0.0 // exact for m ≤ 5
		if m > 5 {
			tol = 1e-11
		}
		for w, x := range a {
			sum += x
			if math.Abs(x-a[n-w]) > tol*x || x < 0 {
				t.Errorf("m = %d: A_%d = %v, A_%d = %v", m, w, x, n-w, a[n-w])
			}
		}
		if k := n - m; math.Abs(sum-math.Ldexp(1, k)) > tol*sum {
			t.Errorf("m = %d: weights sum to %v, want 2^%d", m, sum, k)
		}
		if a[1] != 0 || a[2] != 0 || (m > 2 && a[3] != float64(n*(n-1)/6)) {
			t.Errorf("m = %d: A_1..3 = %v", m, a[1:4])
		}
	}
	if theory.HammingWeights(1) != nil {
		t.Error("m = 1 accepted")
	}
}

func TestHammingBSCLimits(t *testing.T) {
	// At p = 1/2 the received word carries no information: Pb = 1/2. For small p two channel
	// errors dominate; the decoder adds a third, so Pb ≈ (3/7)·C(7,2)·p² = 9p² (common practice,
	// no source).
	if got := theory.HammingBSC(3, 0.5); math.Abs(got-0.5) > 1e-15 {
		t.Errorf("p = 1/2: %v", got)
	}
	if got := theory.HammingBSC(3, 1e-6) / 9e-12; math.Abs(got-1) > 1e-4 {
		t.Errorf("p = 1e-6: Pb/9p² = %v", got)
	}
	if !math.IsNaN(theory.HammingBSC(3, -0.1)) || !math.IsNaN(theory.Hamming74(math.NaN())) {
		t.Error("bad argument gave a number")
	}
	// Hamming74 is HammingBSC on BPSK hard decisions at the coded Eb/N0.
	p := 0.5 * math.Erfc(math.Sqrt(4.0/7*math.Pow(10, 0.6)))
	if got, want := theory.Hamming74(6), theory.HammingBSC(3, p); math.Abs(got-want) > 1e-12*want {
		t.Errorf("Hamming74(6) = %v, want %v", got, want)
	}
}

func TestBlockHard(t *testing.T) {
	// With t = 0 the sum is the binomial mean over n: Pb = p. The general sum against gonum's
	// binomial distribution.
	for _, p := range []float64{1e-4, 0.01, 0.2} {
		if got := theory.BlockHard(31, 0, p); math.Abs(got-p) > 1e-12 {
			t.Errorf("t = 0, p = %v: %v", p, got)
		}
		b := distuv.Binomial{N: 204, P: p}
		want := 0.0
		for j := 9; j <= 204; j++ {
			want += float64(j) * b.Prob(float64(j))
		}
		want /= 204
		if got := theory.BlockHard(204, 8, p); math.Abs(got-want) > 1e-9*want {
			t.Errorf("n = 204, t = 8, p = %v: %v, want %v", p, got, want)
		}
	}
	if !math.IsNaN(theory.BlockHard(7, 7, 0.1)) || !math.IsNaN(theory.RS(204, 189, 5)) {
		t.Error("bad argument gave a number")
	}
	// RS on BPSK: bytes wrong with ps = 1 − (1 − p)⁸, p from the coded Eb/N0.
	p := theory.BPSK(6 + theory.ToDB(188.0/204))
	ps := 1 - math.Pow(1-p, 8)
	if got, want := theory.RS(204, 188, 6), theory.BlockHard(204, 8, ps)*p/ps; math.Abs(got-want) > 1e-9*want {
		t.Errorf("RS(204, 188) at 6 dB: %v, want %v", got, want)
	}
}

func TestSpectrumOnRepetitionCode(t *testing.T) {
	// The rate-1/3 repetition code as a one-event "spectrum" (d = 3, one bit): soft combining
	// gives exactly BPSK, Q(√(2γb)); majority voting gives 3p²(1 − p) + p³ with p = Q(√(2γb/3))
	// (common practice, no source). Both bounds are exact for it.
	rep := theory.Spectrum{Free: 3, A: []float64{1}, B: []float64{1}, Rate: 1.0 / 3}
	for _, db := range []float64{0, 3, 6, 9} {
		if got, want := rep.Soft(db), theory.BPSK(db); math.Abs(got-want) > 1e-12*want {
			t.Errorf("%v dB: soft %v, want %v", db, got, want)
		}
		p := theory.Q(math.Sqrt(2 * theory.FromDB(db) / 3))
		if got, want := rep.Hard(db), 3*p*p*(1-p)+p*p*p; math.Abs(got-want) > 1e-12*want {
			t.Errorf("%v dB: hard %v, want %v", db, got, want)
		}
		if rep.Event(db) != rep.Soft(db) {
			t.Errorf("%v dB: one event of one bit, but Event ≠ Soft", db)
		}
	}
	// Even distance, ties count half: d = 2 gives p² + ½·2p(1 − p) = p.
	two := theory.Spectrum{Free: 2, A: []float64{1}, B: []float64{1}, Rate: 0.5}
	if got, want := two.Hard(4), theory.BPSK(4+theory.ToDB(0.5)); math.Abs(got-want) > 1e-12*want {
		t.Errorf("d = 2: hard %v, want p = %v", got, want)
	}
}

func TestConvK7BoundsOrder(t *testing.T) {
	// Soft decisions gain about 2 dB over hard ones (Proakis §8.2; common practice): the soft
	// bound at x dB lies below the hard bound at x dB and above it at x − 3 dB.
	for _, db := range []float64{4, 5, 6, 7} {
		s, h, h3 := theory.ConvK7Soft(db), theory.ConvK7Hard(db), theory.ConvK7Hard(db+3)
		if !(s < h && h3 < s) {
			t.Errorf("%v dB: soft %.3g, hard %.3g, hard at +3 dB %.3g", db, s, h, h3)
		}
	}
}

// A union bound above 1/2 says nothing a guessing decoder (BER 1/2) does not, so Soft and Hard
// leave it out (NaN) rather than report it or a clipped 0.5; where the sum is below 1/2 it is
// returned as summed (common practice, no source). At 1 dB the K = 7 soft sum is far above 1
// and at 5 dB well below 1e-4 (Proakis, Digital Communications, 4th ed., 2001, Fig. 8.2-16;
// from memory).
func TestUnionBoundAboveHalfLeftOut(t *testing.T) {
	for _, c := range []struct {
		name string
		f    func(float64) float64
	}{{"soft", theory.ConvK7Soft}, {"hard", theory.ConvK7Hard}} {
		if v := c.f(1); !math.IsNaN(v) {
			t.Errorf("%s at 1 dB: %v, want NaN (the sum exceeds 1/2)", c.name, v)
		}
		for db := 0.0; db <= 10; db += 0.25 {
			if v := c.f(db); !math.IsNaN(v) && !(v > 0 && v <= 0.5) {
				t.Errorf("%s at %v dB: %v, want NaN or a rate in (0, 1/2]", c.name, db, v)
			}
		}
	}
	if v := theory.ConvK7Soft(5); !(v > 0 && v < 1e-4) {
		t.Errorf("soft at 5 dB: %v, want below 1e-4", v)
	}
}
