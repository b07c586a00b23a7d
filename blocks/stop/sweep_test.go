package stop_test

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"tally/blocks/link"
	"tally/blocks/stats"
	"tally/blocks/stop"
)

// bpsk is the BER of BPSK (or Gray QPSK) on AWGN, ½·erfc(√(Eb/N0)) (Proakis, Digital
// Communications, 4th ed., 2001, eq. 5.2-5).
func bpsk(db float64) float64 { return 0.5 * math.Erfc(math.Sqrt(math.Pow(10, db/10))) }

// outcome is a finished point that counted errors errors in bits bits, with its
// Clopper–Pearson interval.
func outcome(x float64, errors, bits int64) stop.Outcome {
	e, err := stats.ClopperPearson(errors, bits, 0.95)
	if err != nil {
		panic(err)
	}
	return stop.Outcome{X: x, Tally: link.Tally{Trials: bits, Errors: errors}, Estimate: e}
}

func ExampleFloor() {
	r := stop.Floor(1e-6)
	done := []stop.Outcome{outcome(6, 100, 4e4), outcome(8, 100, 5e5), outcome(10, 0, 4e6)}
	for i := range done {
		skip, why := r.Skip(done[:i+1], 12)
		fmt.Println(strings.TrimSpace(fmt.Sprint(skip, " ", why)))
	}
	// Output:
	// false
	// false
	// true the interval of the point at 10 lies below the floor 1e-06 (upper limit 7.5e-07)
}

func ExampleBudget() {
	// A straight line on the BER plot: a decade per 2 dB.
	done := []stop.Outcome{outcome(2, 100, 1e3), outcome(4, 100, 1e4)}
	for _, x := range []float64{6, 8, 10} {
		skip, why := stop.Budget(1e6).Skip(done, x)
		fmt.Println(strings.TrimSpace(fmt.Sprint(x, " ", skip, " ", why)))
	}
	// Output:
	// 6 false
	// 8 false
	// 10 true predicted BER 1e-05 at 10 needs about 1e+07 bits for 100 errors (budget 1e+06)
}

// On a curve straight in log BER against dB the prediction is exact; on BPSK's, which bends
// down, it is optimistic (the true BER is lower, the true bits more).
func TestBudgetPrediction(t *testing.T) {
	r := stop.Budget(1e9)
	var line []stop.Outcome
	for _, x := range []float64{0, 1, 2} {
		ber := math.Pow(10, -1-x/3)
		line = append(line, stop.Outcome{X: x, Tally: link.Tally{Trials: 1e6, Errors: int64(ber * 1e6)}, Estimate: stats.Estimate{Rate: ber}})
	}
	for _, x := range []float64{3, 9, 15} {
		got, ok := r.Predict(line, x)
		if want := math.Pow(10, -1-x/3); !ok || math.Abs(got/want-1) > 1e-9 {
			t.Errorf("Predict(line, %g) = %g, %v; want %g", x, got, ok, want)
		}
	}

	var curve []stop.Outcome
	for _, x := range []float64{0, 2, 4, 6, 8} {
		ber := bpsk(x)
		curve = append(curve, stop.Outcome{X: x, Tally: link.Tally{Trials: 1e9, Errors: int64(ber * 1e9)}, Estimate: stats.Estimate{Rate: ber}})
	}
	// 9.59 dB is where BPSK reaches 1e-5 (textbook value, from memory).
	if got, _ := r.Predict(curve, 9.59); !(got > 1e-5) {
		t.Errorf("prediction %g at 9.59 dB should lie above the true 1e-5 on a bending curve", got)
	}
	if skip, _ := stop.Budget(1e7).Skip(curve, 9.59); skip {
		t.Error("predicted ~1e7 bits or less at 9.59 dB, yet skipped under a 1e7 budget")
	}
	if skip, why := stop.Budget(1e6).For(100).Skip(curve, 9.59); !skip || !strings.Contains(why, "budget 1e+06") {
		t.Errorf("should skip 9.59 dB under a 1e6-bit budget, got %v %q", skip, why)
	}
}

// Points with no errors carry no rate to extrapolate: they are passed over, and with fewer
// than two points that counted errors nothing is skipped.
func TestBudgetNeedsTwoPointsWithErrors(t *testing.T) {
	r := stop.Budget(10)
	if skip, _ := r.Skip(nil, 4); skip {
		t.Error("skipped with no finished point")
	}
	one := []stop.Outcome{outcome(0, 100, 1e3), outcome(2, 0, 1e9)}
	if skip, _ := r.Skip(one, 4); skip {
		t.Error("skipped with one point that counted errors")
	}
	same := []stop.Outcome{outcome(0, 100, 1e3), outcome(0, 90, 1e3)}
	if _, ok := r.Predict(same, 4); ok {
		t.Error("predicted from two points at the same x")
	}
	two := []stop.Outcome{outcome(0, 100, 1e3), outcome(2, 100, 1e4), outcome(4, 0, 1e9)}
	if got, ok := r.Predict(two, 6); !ok || math.Abs(got/1e-4-1) > 1e-9 {
		t.Errorf("Predict over a zero-error point = %g, %v; want 1e-4 from the two points with errors", got, ok)
	}
}

func TestFloorNeedsAProof(t *testing.T) {
	r := stop.Floor(1e-6)
	// A rate estimated below the floor is not enough: its interval must lie below it.
	done := []stop.Outcome{outcome(10, 2, 4e6)} // rate 5e-7, High ≈ 1.8e-6
	if skip, _ := r.Skip(done, 12); skip {
		t.Error("skipped on an estimate below the floor whose interval is not")
	}
	if skip, _ := r.Skip([]stop.Outcome{{X: 3}}, 12); skip {
		t.Error("skipped on a point with no bits")
	}
}
