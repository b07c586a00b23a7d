package rng_test

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"

	"tally/blocks/rng"
	"tally/blocks/stats"
)

// Bits lays out the stream's draws bit by bit: bit j of the n-th draw is dst[64n+j], the
// last partial word from one more draw.
func TestBitsLayout(t *testing.T) {
	for _, n := range []int{0, 1, 63, 64, 65, 200, 4096} {
		got := make([]byte, n)
		s := rng.New(5)
		s.Bits(got)
		ref := rng.New(5)
		var w uint64
		for i := range got {
			if i%64 == 0 {
				w = ref.Uint64()
			}
			if want := byte(w >> (i % 64) & 1); got[i] != want {
				t.Fatalf("n %d: bit %d = %d, want %d", n, i, got[i], want)
			}
		}
		if n > 0 && s.Uint64() != ref.Uint64() {
			t.Fatalf("n %d: Bits used the wrong number of draws", n)
		}
	}
}

// Balance: the ones among 10⁶ bits fall in a 99 % Clopper–Pearson interval of ½, and the
// counts of the 64 bit positions of a word, binomial(n, ½) each, pass a chi-square test
// against distuv.ChiSquared (common practice, no source).
func TestBitsBalanced(t *testing.T) {
	const words = 1 << 14
	b := make([]byte, 64*words)
	rng.New(6).Bits(b)
	var ones int64
	var pos [64]float64
	for i, v := range b {
		ones += int64(v)
		pos[i%64] += float64(v)
	}
	ci, _ := stats.ClopperPearson(ones, int64(len(b)), 0.99)
	if !ci.Contains(0.5) {
		t.Errorf("%d ones in %d bits: 99%% interval [%.5f, %.5f] misses ½", ones, len(b), ci.Low, ci.High)
	}
	var chi2 float64
	for _, c := range pos {
		d := c - words/2
		chi2 += d * d / (words / 4) // binomial variance n/4 per position
	}
	if q := (distuv.ChiSquared{K: 64}).Quantile(0.999); chi2 > q {
		t.Errorf("bit positions: chi-square %.1f on 64 degrees of freedom above %.1f", chi2, q)
	}
}

// The keying contract: a stream is its key; Reset rewinds; neighbouring (seed, point, frame,
// block) give unrelated keys; Sub streams differ from their parent.
func TestKeys(t *testing.T) {
	a, b := rng.New(rng.Key(1, 2, 3, 4)), rng.New(0)
	b.Reset(rng.Key(1, 2, 3, 4))
	for range 10 {
		if a.Uint64() != b.Uint64() {
			t.Fatal("two streams of one key differ")
		}
	}
	b.Reset(rng.Key(1, 2, 3, 4))
	if b.Uint64() != rng.New(rng.Key(1, 2, 3, 4)).Uint64() {
		t.Fatal("Reset does not rewind")
	}
	seen := map[uint64][4]int{}
	for seed := range uint64(3) {
		for p := range 4 {
			for f := range 64 {
				for k := range 6 {
					key := rng.Key(seed, p, f, k)
					if prev, ok := seen[key]; ok {
						t.Fatalf("Key(%d, %d, %d, %d) repeats Key%v", seed, p, f, k, prev)
					}
					seen[key] = [4]int{int(seed), p, f, k}
				}
			}
		}
	}
	// Correlation of the first normals of neighbouring frames' streams: |ρ| below 4.5/√n
	// (common practice, no source).
	const n = 20000
	var sxy float64
	for f := range n {
		sxy += rng.New(rng.Key(1, 0, f, 2)).Norm() * rng.New(rng.Key(1, 0, f+1, 2)).Norm()
	}
	if r := sxy / n; math.Abs(r) > 4.5/math.Sqrt(n) {
		t.Errorf("neighbouring frames: correlation %.4f", r)
	}
	s := rng.New(9)
	if s.Sub(0).Uint64() == rng.New(9).Uint64() || s.Sub(0).Uint64() == s.Sub(1).Uint64() {
		t.Error("Sub streams repeat their parent or each other")
	}
}

// Float64 and Open: uniform on [0, 1) and (0, 1), checked by a chi-square on 100 bins.
func TestUniform(t *testing.T) {
	const n, bins = 1_000_000, 100
	s := rng.New(7)
	var c [bins]float64
	for i := range n {
		u := s.Float64()
		if i%2 == 1 {
			u = s.Open()
			if u <= 0 || u >= 1 {
				t.Fatalf("Open = %v", u)
			}
		}
		c[int(u*bins)]++
	}
	var chi2 float64
	for _, v := range c {
		chi2 += (v - n/bins) * (v - n/bins) / (n / bins)
	}
	if q := (distuv.ChiSquared{K: bins - 1}).Quantile(0.999); chi2 > q {
		t.Errorf("chi-square %.1f above %.1f", chi2, q)
	}
}
