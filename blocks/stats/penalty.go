package stats

import (
	"fmt"
	"math"
)

// Loss is how far a measured crossing lies from a theory curve at the same target BER.
type Loss struct {
	Theory float64 // swept value where the theory curve reaches the target
	DB     float64 // the crossing's X − Theory: positive when the measurement needs more
	Low    float64 // interval of DB: the crossing's interval shifted the same way
	High   float64
}

// Penalty is the distance, in the swept unit (dB for an Eb/N0 sweep), from the theory curve
// to the crossing c at c.Target. The theory's value at the target is found by bisection on
// log10 theory(x) − log10 target, from a bracket grown outward from c.X (up to ±1000 units);
// the curve should be monotonic near the crossing. A theory value of 0 counts as below every
// target (log −∞); NaN is an error.
func Penalty(c Crossing, theory func(x float64) float64) (Loss, error) {
	if !(c.Target > 0 && c.Target < 1) {
		return Loss{}, fmt.Errorf("stats.Penalty: target %v must lie strictly between 0 and 1", c.Target)
	}
	lt := math.Log10(c.Target)
	var bad error
	g := func(x float64) float64 {
		v := theory(x)
		if math.IsNaN(v) || v < 0 {
			bad = fmt.Errorf("stats.Penalty: the theory curve is %v at %g", v, x)
			return 0
		}
		return math.Log10(v) - lt
	}
	x0 := c.X
	g0 := g(x0)
	if bad != nil {
		return Loss{}, bad
	}
	a, b, ga := x0, x0, g0
	found := g0 == 0
	for s := 0.5; !found && s <= 1000; s *= 2 {
		for _, x := range []float64{x0 + s, x0 - s} {
			gx := g(x)
			if bad != nil {
				return Loss{}, bad
			}
			if gx == 0 || (gx > 0) != (g0 > 0) {
				a, b, ga, found = x0, x, g0, true
				break
			}
		}
	}
	if !found {
		return Loss{}, fmt.Errorf("stats.Penalty: the theory curve does not reach %g within 1000 of %g", c.Target, x0)
	}
	// Bisection keeps the sign change between a and b.
	for range 200 {
		m := 0.5 * (a + b)
		if m == a || m == b {
			break
		}
		gm := g(m)
		if bad != nil {
			return Loss{}, bad
		}
		if gm == 0 {
			a, b = m, m
			break
		}
		if (gm > 0) == (ga > 0) {
			a, ga = m, gm
		} else {
			b = m
		}
	}
	t := 0.5 * (a + b)
	return Loss{Theory: t, DB: c.X - t, Low: c.Low - t, High: c.High - t}, nil
}
