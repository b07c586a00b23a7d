package stats

import (
	"errors"
	"fmt"
	"math"
	"slices"
)

// Crossing is where a swept BER curve reaches a target: the swept value X (for example
// Eb/N0 in dB) and an interval [Low, High] for it read off the curves of the points' lower
// and upper limits. An end is −Inf or +Inf when the limits do not close the interval inside
// the sweep on that side.
type Crossing struct {
	Target       float64 // BER
	X, Low, High float64 // swept value at the target, and its interval
}

// CrossingMethod names AtTarget's method in run records.
const CrossingMethod = "log-linear interpolation between the bracketing points; interval from the points' limits (monotonic curve assumed)"

// AtTarget reads the swept value where the estimates est at the swept values x (strictly
// monotonic, same length) reach target. Between two points log10 BER is taken as linear in
// x (a straight segment on the usual BER plot); X is the first crossing walking the curve
// from its high-BER end.
//
// The interval takes the true curve as monotonic: it crosses the target after the last
// place where the lower-limit curve is still at or above it, and before the first place
// where the upper-limit curve is at or below it, both read the same way between points. A
// lower limit of 0 (no errors) is −∞ in log, which puts that crossing on the neighbouring
// point. Each end rests on one side of the points' intervals, so the interval is a guide at
// about the points' confidence, not an exact statement.
//
// It fails when the target is not in (0, 1), when the estimates never reach it, or when an
// estimate beside the crossing is 0 (a point with no errors has no rate to interpolate: run
// it longer).
func AtTarget(x []float64, est []Estimate, target float64) (Crossing, error) {
	if !(target > 0 && target < 1) {
		return Crossing{}, fmt.Errorf("stats.AtTarget: target %v must lie strictly between 0 and 1", target)
	}
	if len(x) != len(est) {
		return Crossing{}, fmt.Errorf("stats.AtTarget: %d swept values for %d estimates", len(x), len(est))
	}
	if len(x) < 2 {
		return Crossing{}, errors.New("stats.AtTarget: a crossing needs at least two points")
	}
	up := x[1] > x[0]
	for i := 1; i < len(x); i++ {
		if math.IsNaN(x[i]) || math.IsNaN(x[i-1]) || x[i] == x[i-1] || (x[i] > x[i-1]) != up {
			return Crossing{}, errors.New("stats.AtTarget: swept values must be strictly monotonic")
		}
	}
	// Walk from the high-BER end, so the curve falls along the walk.
	x, est = slices.Clone(x), slices.Clone(est)
	if est[len(est)-1].Rate > est[0].Rate {
		slices.Reverse(x)
		slices.Reverse(est)
	}
	n := len(x)
	rate, lo, hi := make([]float64, n), make([]float64, n), make([]float64, n)
	for i, e := range est {
		rate[i], lo[i], hi[i] = e.Rate, e.Low, e.High
	}

	c := Crossing{Target: target}
	i := 0
	for ; i < n-1 && !(rate[i] >= target && rate[i+1] <= target); i++ {
	}
	if i == n-1 {
		return Crossing{}, fmt.Errorf("stats.AtTarget: the curve does not reach %g in the sweep", target)
	}
	if rate[i] == 0 || rate[i+1] == 0 {
		return Crossing{}, fmt.Errorf("stats.AtTarget: the point at %g beside the crossing of %g counted no errors", x[i+1], target)
	}
	c.X = cross(x, rate, i, target)

	// Beyond the start and the end of the walk.
	before, after := math.Inf(-1), math.Inf(1)
	if x[n-1] < x[0] {
		before, after = after, before
	}
	// Before: the last place the lower limit is still at or above the target.
	if j := lastIndex(lo, func(v float64) bool { return v >= target }); j == n-1 {
		before = x[n-1]
	} else if j >= 0 {
		before = cross(x, lo, j, target)
	}
	// After: the first place the upper limit is at or below the target.
	if j := slices.IndexFunc(hi, func(v float64) bool { return v <= target }); j == 0 {
		after = x[0]
	} else if j > 0 {
		after = cross(x, hi, j-1, target)
	}
	c.Low = math.Min(c.X, math.Min(before, after))
	c.High = math.Max(c.X, math.Max(before, after))
	return c, nil
}

func lastIndex(v []float64, f func(float64) bool) int {
	for i := len(v) - 1; i >= 0; i-- {
		if f(v[i]) {
			return i
		}
	}
	return -1
}

// cross is the x of segment [i, i+1] where log10 v reaches log10 t, v[i] ≥ t ≥ v[i+1].
func cross(x, v []float64, i int, t float64) float64 {
	var f float64
	switch {
	case v[i] == v[i+1]:
		f = 0
	case v[i+1] == 0: // log −∞: the crossing sits on the point with a rate
		f = 0
	default:
		la, lb := math.Log10(v[i]), math.Log10(v[i+1])
		f = (math.Log10(t) - la) / (lb - la)
	}
	return x[i] + f*(x[i+1]-x[i])
}
