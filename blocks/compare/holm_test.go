package compare

import (
	"math"
	"testing"
)

// From the definition (Holm, Scand. J. Statist. 6, 1979): with α = 0.05 and m = 4, the sorted
// p-values 0.005 ≤ 0.05/4 and 0.01 ≤ 0.05/3 are rejected, 0.03 > 0.05/2 stops the procedure,
// so 0.04 is kept although it lies below α. The adjusted values are 4·0.005, 3·0.01,
// max(0.03, 2·0.03) and max(0.06, 1·0.04).
func TestHolm(t *testing.T) {
	p := []float64{0.01, 0.04, 0.03, 0.005}
	got := Holm(p)
	want := []float64{0.03, 0.06, 0.06, 0.02}
	for i := range want {
		if math.Abs(got[i]-want[i]) > 1e-15 {
			t.Fatalf("Holm(%v) = %v, want %v", p, got, want)
		}
	}
	var rejected []float64
	for i, a := range got {
		if a <= 0.05 {
			rejected = append(rejected, p[i])
		}
	}
	if len(rejected) != 2 || rejected[0] != 0.01 || rejected[1] != 0.005 {
		t.Errorf("rejected %v, want 0.01 and 0.005", rejected)
	}
	if got := Holm([]float64{0.6, 0.7}); got[0] != 1 || got[1] != 1 {
		t.Errorf("adjusted values not capped at 1: %v", got)
	}
	if got := Holm(nil); len(got) != 0 {
		t.Errorf("Holm(nil) = %v", got)
	}
}
