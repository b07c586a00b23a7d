package modem

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
)

func TestLogI0AgainstIntegral(t *testing.T) {
	// I0(x) = (1/π)∫_0^π e^{x cos θ} dθ (Abramowitz and Stegun, Handbook of Mathematical
	// Functions, 1964, eq. 9.6.16), by quadrature with e^x taken out; and I0(1) = 1.266065878,
	// I0(5) = 27.23987182 (ibid., Table 9.8, from memory).
	for _, x := range []float64{0, 0.1, 1, 3, 7.5, 15, 19.99, 20, 20.01, 40, 200, 5000} {
		v := quad.Fixed(func(th float64) float64 { return math.Exp(x * (math.Cos(th) - 1)) }, 0, math.Pi, 400, nil, 0)
		want := x + math.Log(v/math.Pi)
		if got := logI0(x); math.Abs(got-want) > 1e-7*(1+math.Abs(want)) {
			t.Errorf("logI0(%v) = %.12g, integral %.12g", x, got, want)
		}
	}
	for _, c := range []struct{ x, i0 float64 }{{1, 1.266065878}, {5, 27.23987182}} {
		if got := math.Exp(logI0(c.x)); math.Abs(got-c.i0) > 1e-8*c.i0 {
			t.Errorf("I0(%v) = %.10g, table %.10g", c.x, got, c.i0)
		}
	}
}
