package modem

import (
	"math"
	"math/rand/v2"
	"testing"
)

// decideRef is the slicing decision as it was before decide used boundaries: the reference.
func decideRef(a *axis, x float64, dst []byte) {
	if a.L == 2 {
		dst[0] = sign(x)
		return
	}
	t := math.Floor((float64(a.L-1)-x/a.d)*0.5 + 0.5)
	i := int(min(max(t, 0), float64(a.L-1)))
	putLabel(dst, int(a.labels[i]))
}

// TestDecideMatchesSlicing compares decide with the division-and-floor slicing on random
// inputs, on and a few ulps around every nominal and exact boundary, and beyond the outer
// points, for L = 2 … 32 and several spacings.
func TestDecideMatchesSlicing(t *testing.T) {
	rnd := rand.New(rand.NewPCG(1, 2))
	for _, L := range []int{2, 4, 8, 16, 32} {
		ds := []float64{1, 0.1, 3, math.Sqrt(3 / float64(L*L-1)), math.Sqrt(3 / (2 * float64(L*L-1)))}
		for range 5 {
			ds = append(ds, math.Exp(rnd.NormFloat64()))
		}
		for _, d := range ds {
			a := newAxis(L, d)
			var xs []float64
			for _, x := range []float64{0, math.Copysign(0, -1), math.Inf(1), math.Inf(-1),
				math.MaxFloat64, -math.MaxFloat64, math.SmallestNonzeroFloat64, -math.SmallestNonzeroFloat64,
				1e300, -1e300, 1e-300, -1e-300} {
				xs = append(xs, x)
			}
			var centres []float64
			for j := 0; j <= L; j++ {
				centres = append(centres, d*float64(L-2*j)) // nominal boundaries and beyond the ends
			}
			centres = append(centres, a.levels...)
			centres = append(centres, a.cuts...)
			for _, c := range centres {
				for _, s := range []float64{1, -1} {
					x := c
					for range 8 {
						xs = append(xs, x)
						x = math.Nextafter(x, s*math.Inf(1))
					}
				}
				for range 20 {
					xs = append(xs, c+c*rnd.NormFloat64()*1e-15, c+rnd.NormFloat64()*1e-12)
				}
			}
			for range 20000 {
				xs = append(xs, d*float64(L+2)*(2*rnd.Float64()-1), d*float64(L)*rnd.NormFloat64())
			}
			got, want := make([]byte, a.bits), make([]byte, a.bits)
			for _, x := range xs {
				clear(got)
				decide := a.decide
				decide(x, got)
				decideRef(&a, x, want)
				if string(got) != string(want) {
					t.Fatalf("L=%d d=%v x=%v (%x): decide %v, slicing %v", L, d, x, math.Float64bits(x), got, want)
				}
			}
		}
	}
}
