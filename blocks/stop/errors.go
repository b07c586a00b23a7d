package stop

import (
	"fmt"

	"tally/blocks/link"
	"tally/blocks/stats"
)

// ErrorTarget ends a point once a tap has counted Count errors. Stopping at a fixed number of
// errors is inverse binomial sampling (Haldane, 1945); the engine reports an interval valid for
// it when this rule ends a point.
type ErrorTarget struct {
	Count int64
	On    string // tap; link.TapBER by default
}

// Errors ends a point after n errors on the BER tap. 100 is the trade's usual choice and 10 a
// quick look (common practice, no source).
func Errors(n int64) *ErrorTarget { return &ErrorTarget{Count: n, On: link.TapBER} }

// Tap makes the rule count on another tap, for example link.TapFER for frame errors.
func (r *ErrorTarget) Tap(name string) *ErrorTarget { r.On = name; return r }

// Met is true once the tap's errors reach Count. On a tap estimated with weights (importance
// sampling, semi-analytic; see link.Estimator) it is met once the estimate is as precise as
// Count counted errors would make it (stats.EquivalentErrors), so the same rule serves both;
// a tap the estimator does not estimate never meets it.
func (r *ErrorTarget) Met(p *Progress) bool {
	t, _ := p.Tap(r.On)
	switch t.Estimator {
	case link.Count:
		return t.Errors >= r.Count
	case link.Unestimated:
		return false
	}
	return stats.EquivalentErrors(t) >= float64(r.Count)
}

// Name is "errors" (or "<tap>_errors" off the BER tap).
func (r *ErrorTarget) Name() string {
	if r.On == link.TapBER || r.On == "" {
		return "errors"
	}
	return r.On + "_errors"
}

// Err reports a count below one.
func (r *ErrorTarget) Err() error {
	if r.Count < 1 {
		return fmt.Errorf("stop.Errors: count %d must be at least 1", r.Count)
	}
	return nil
}

// BitCap ends a point once the BER tap has counted Max bits.
type BitCap struct{ Max int64 }

// Bits ends a point after n bits (a float, so 1e9 can be typed as such).
func Bits(n float64) *BitCap { return &BitCap{Max: int64(n)} }

// Met is true once the BER tap's bits reach Max.
func (r *BitCap) Met(p *Progress) bool {
	t, _ := p.Tap(link.TapBER)
	return t.Trials >= r.Max
}

// Name is "bits".
func (r *BitCap) Name() string { return "bits" }

// Err reports a cap below one bit.
func (r *BitCap) Err() error {
	if r.Max < 1 {
		return fmt.Errorf("stop.Bits: cap %d must be at least 1 bit", r.Max)
	}
	return nil
}
