package stats_test

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"tally/blocks/stats"
)

// bpsk is the BER of BPSK on AWGN, ½·erfc(√(Eb/N0)) (Proakis, Digital Communications, 4th
// ed., 2001, eq. 5.2-5). It reaches 1e-5 at 9.59 dB (textbook value, from memory).
func bpsk(db float64) float64 { return 0.5 * math.Erfc(math.Sqrt(math.Pow(10, db/10))) }

// curve samples f from a to b in steps, with limits at rate/spread and rate·spread.
func curve(f func(float64) float64, a, b, step, spread float64) ([]float64, []stats.Estimate) {
	var x []float64
	var e []stats.Estimate
	for v := a; v <= b+1e-9; v += step {
		r := f(v)
		x = append(x, v)
		e = append(e, stats.Estimate{Rate: r, Low: r / spread, High: math.Min(1, r*spread)})
	}
	return x, e
}

func TestAtTargetBPSK(t *testing.T) {
	for _, c := range []struct{ step, tol float64 }{{1, 0.05}, {0.25, 0.005}} {
		x, e := curve(bpsk, 0, 12, c.step, 1.3)
		cr, err := stats.AtTarget(x, e, 1e-5)
		if err != nil {
			t.Fatal(err)
		}
		if !near(cr.X, 9.59, c.tol) {
			t.Errorf("step %g dB: 1e-5 at %.3f dB, want 9.59", c.step, cr.X)
		}
		// The limit curves lie ×1.3 off, about a tenth of a decade, and BPSK falls about a
		// decade per dB there: the interval is about ±0.12 dB.
		if !(cr.Low < cr.X && cr.X < cr.High) || !near(cr.X-cr.Low, 0.12, 0.03) || !near(cr.High-cr.X, 0.12, 0.03) {
			t.Errorf("step %g dB: interval [%.3f, %.3f] around %.3f", c.step, cr.Low, cr.High, cr.X)
		}
	}
}

func TestPenaltyAgainstTheory(t *testing.T) {
	const loss = 1.5 // a receiver 1.5 dB worse than theory
	x, e := curve(func(v float64) float64 { return bpsk(v - loss) }, 0, 14, 0.25, 1.2)
	cr, err := stats.AtTarget(x, e, 1e-5)
	if err != nil {
		t.Fatal(err)
	}
	l, err := stats.Penalty(cr, bpsk)
	if err != nil {
		t.Fatal(err)
	}
	if !near(l.Theory, 9.59, 0.005) || !near(bpsk(l.Theory)/1e-5, 1, 1e-9) {
		t.Errorf("theory reaches 1e-5 at %.4f dB (BER there %g), want 9.59", l.Theory, bpsk(l.Theory))
	}
	if !near(l.DB, loss, 0.005) || !(l.Low < l.DB && l.DB < l.High) {
		t.Errorf("penalty %.3f dB [%.3f, %.3f], want %v inside its interval", l.DB, l.Low, l.High, loss)
	}
	// A theory that never reaches the target, and one that is not a number.
	if _, err := stats.Penalty(cr, func(float64) float64 { return 0.5 }); err == nil {
		t.Error("no error for a theory curve that never reaches the target")
	}
	if _, err := stats.Penalty(cr, func(float64) float64 { return math.NaN() }); err == nil || !strings.Contains(err.Error(), "NaN") {
		t.Errorf("NaN theory: %v", err)
	}
}

func ExampleAtTarget() {
	// Measured points of a link: 100 errors each, Clopper–Pearson at 95 %.
	x := []float64{6, 7, 8, 9, 10}
	bits := []int64{4.2e4, 1.3e5, 5.3e5, 3.1e6, 2.7e7}
	var est []stats.Estimate
	for _, n := range bits {
		e, _ := stats.ClopperPearson(100, n, 0.95)
		est = append(est, e)
	}
	c, _ := stats.AtTarget(x, est, 1e-5)
	fmt.Printf("1e-5 at %.2f dB [%.2f, %.2f]\n", c.X, c.Low, c.High)
	l, _ := stats.Penalty(c, bpsk)
	fmt.Printf("%.2f dB from BPSK theory [%.2f, %.2f]\n", l.DB, l.Low, l.High)
	// Output:
	// 1e-5 at 9.54 dB [9.45, 9.63]
	// -0.05 dB from BPSK theory [-0.14, 0.04]
}

// Where a limit curve stays on one side of the target the crossing's interval is open.
func TestAtTargetOpenEnds(t *testing.T) {
	x := []float64{0, 1, 2, 3}
	e := []stats.Estimate{
		{Rate: 1e-2, Low: 5e-3, High: 2e-2},
		{Rate: 2e-3, Low: 1e-3, High: 4e-3},
		{Rate: 4e-4, Low: 2e-4, High: 2e-3}, // few errors: wide
		{Rate: 1e-4, Low: 0, High: 2e-3},
	}
	c, err := stats.AtTarget(x, e, 1e-3)
	if err != nil {
		t.Fatal(err)
	}
	if !math.IsInf(c.High, 1) || c.Low != 1 || !(c.X > 1 && c.X < 2) {
		t.Errorf("%+v: want Low 1 (the lower limit reaches 1e-3 at the point at 1), High +Inf", c)
	}
	// The lower limit is below 6e-3 from the start: open below.
	if o, err := stats.AtTarget(x, e, 6e-3); err != nil || !math.IsInf(o.Low, -1) || !(o.High > o.X && o.High < 1) {
		t.Errorf("%+v %v: want Low −Inf and a High between X and 1", o, err)
	}
	// The same curve swept the other way round.
	rx := []float64{3, 2, 1, 0}
	re := []stats.Estimate{e[3], e[2], e[1], e[0]}
	d, err := stats.AtTarget(rx, re, 1e-3)
	if err != nil || !near(d.X, c.X, 1e-12) || d.Low != c.Low || d.High != c.High {
		t.Errorf("reversed: %+v %v, want %+v", d, err, c)
	}
	// A rising curve (BER growing with, say, interference level).
	ux := []float64{0, 1, 2}
	ue := []stats.Estimate{{Rate: 1e-4, Low: 5e-5, High: 2e-4}, {Rate: 1e-3, Low: 5e-4, High: 2e-3}, {Rate: 1e-2, Low: 5e-3, High: 2e-2}}
	u, err := stats.AtTarget(ux, ue, 1e-3)
	if err != nil || !near(u.X, 1, 1e-12) || !(u.Low < 1 && u.High > 1) {
		t.Errorf("rising: %+v %v", u, err)
	}
}

func TestAtTargetErrors(t *testing.T) {
	x := []float64{0, 1, 2}
	e := []stats.Estimate{{Rate: 1e-2, High: 2e-2}, {Rate: 1e-3, High: 2e-3}, {Rate: 1e-4, High: 2e-4}}
	for _, c := range []struct {
		x      []float64
		e      []stats.Estimate
		target float64
		want   string
	}{
		{x, e, 0, "target 0"},
		{x, e, math.NaN(), "target NaN"},
		{x, e, 1e-6, "does not reach"},
		{x[:2], e, 1e-3, "2 swept values for 3"},
		{[]float64{0, 2, 1}, e, 1e-3, "monotonic"},
		{[]float64{0, 1, 1}, e, 1e-3, "monotonic"},
		{x[:1], e[:1], 1e-3, "two points"},
		{x, []stats.Estimate{{Rate: 1e-2}, {Rate: 1e-3}, {Rate: 0, High: 1e-3}}, 5e-4, "no errors"},
	} {
		if _, err := stats.AtTarget(c.x, c.e, c.target); err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%v at %g: %v, want %q", c.x, c.target, err, c.want)
		}
	}
}
