package stop

import (
	"fmt"
	"math"

	"tally/blocks/link"
	"tally/blocks/stats"
)

// Outcome is a finished point as a sweep rule sees it.
type Outcome struct {
	X        float64        // value of the first sweep axis (for example Eb/N0 in dB)
	Tally    link.Tally     // counts of the tap the rule judges (SweepTap: the BER unless set)
	Estimate stats.Estimate // the point's reported estimate and interval of that tap
}

// SweepTap is the tap a sweep rule judges: the one set by its Tap method (Floor, Budget), else
// the BER tap.
func SweepTap(r SweepRule) string {
	if t, ok := r.(interface{ sweepTap() string }); ok && t.sweepTap() != "" {
		return t.sweepTap()
	}
	return link.TapBER
}

// SweepRule decides, between points along the first sweep axis, whether the next point is
// worth running. The engine calls Skip before each point of a curve with the finished points
// of that curve, in sweep order; a skipped point is not run and its why goes to the run record.
// Like the point rules, a sweep rule sees only counts, so a replay skips the same points.
type SweepRule interface {
	Skip(done []Outcome, next float64) (skip bool, why string)
}

// FloorRule ends a curve after its first point shown below Floor (the point's High < Floor):
// below that rate nothing more is of interest, and the points beyond would be the dearest.
type FloorRule struct {
	Floor float64
	On    string // the tap judged; "" for the BER
}

// Floor ends a curve after the first point whose interval lies below ber.
func Floor(ber float64) *FloorRule { return &FloorRule{Floor: ber} }

// Tap makes the floor judge another tap, for example a payload tap of the script's own that
// the point rules count on (stop.Errors(100).Tap("payload")).
func (r *FloorRule) Tap(name string) *FloorRule { r.On = name; return r }

func (r *FloorRule) sweepTap() string { return r.On }

// Skip is true once any finished point is shown below Floor.
func (r *FloorRule) Skip(done []Outcome, next float64) (bool, string) {
	for _, o := range done {
		if o.Tally.Trials > 0 && o.Estimate.High < r.Floor {
			return true, fmt.Sprintf("the interval of the point at %g lies below the floor %g (upper limit %.2g)", o.X, r.Floor, o.Estimate.High)
		}
	}
	return false, ""
}

// Err reports a floor outside (0, 1).
func (r *FloorRule) Err() error { return checkRate("stop.Floor", r.Floor) }

// BitBudget skips a point predicted to need more than Max bits to count Errors errors.
//
// The prediction extrapolates log10 BER linearly in the swept value from the last two
// finished points that counted errors (a straight line on the usual BER plot), and the bits
// needed are about Errors/BER. With fewer than two such points nothing is skipped. The
// prediction is only a guide: a curve that bends down (a waterfall) needs more than it says,
// one that flattens (an error floor) less.
type BitBudget struct {
	Max    float64 // bits a point may take
	Errors int64   // errors a point is meant to count (as its Errors rule); 100 by default
	On     string  // the tap whose rate predicts the bits; "" for the BER
}

// Budget skips points predicted to need more than bits bits for 100 errors.
func Budget(bits float64) *BitBudget { return &BitBudget{Max: bits, Errors: 100} }

// For sets the errors a point is meant to count (match the point's Errors rule).
func (r *BitBudget) For(errors int64) *BitBudget { r.Errors = errors; return r }

// Tap makes the budget predict from another tap's rate (the tap the point's Errors rule
// counts on); its trials are then what the budget counts.
func (r *BitBudget) Tap(name string) *BitBudget { r.On = name; return r }

func (r *BitBudget) sweepTap() string { return r.On }

// Predict is the BER expected at x from the last two finished points with errors, and false
// when there are not two such points at distinct x.
func (r *BitBudget) Predict(done []Outcome, x float64) (float64, bool) {
	var pts []Outcome
	for i := len(done) - 1; i >= 0 && len(pts) < 2; i-- {
		if o := done[i]; o.Tally.Errors > 0 && o.Estimate.Rate > 0 {
			pts = append(pts, o)
		}
	}
	if len(pts) < 2 || pts[0].X == pts[1].X {
		return 0, false
	}
	a, b := pts[1], pts[0] // b is the later one
	la, lb := math.Log10(a.Estimate.Rate), math.Log10(b.Estimate.Rate)
	slope := (lb - la) / (b.X - a.X)
	return math.Pow(10, lb+slope*(x-b.X)), true
}

// Skip is true when the predicted bits exceed Max.
func (r *BitBudget) Skip(done []Outcome, next float64) (bool, string) {
	ber, ok := r.Predict(done, next)
	if !ok {
		return false, ""
	}
	need := float64(r.Errors) / ber
	if need > r.Max {
		return true, fmt.Sprintf("predicted BER %.2g at %g needs about %.2g bits for %d errors (budget %.2g)", ber, next, need, r.Errors, r.Max)
	}
	return false, ""
}

// Err reports a budget below one bit or an error count below one.
func (r *BitBudget) Err() error {
	switch {
	case !(r.Max >= 1) || math.IsInf(r.Max, 1):
		return fmt.Errorf("stop.Budget: budget %v must be a finite number of bits, at least 1", r.Max)
	case r.Errors < 1:
		return fmt.Errorf("stop.Budget: errors %d must be at least 1", r.Errors)
	}
	return nil
}
