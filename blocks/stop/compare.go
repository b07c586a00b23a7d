package stop

import (
	"fmt"
	"math"

	"tally/blocks/stats"
)

// DiffShown ends a paired point (sim's Variants) once the difference between every variant and
// the reference is shown: the paired comparison on the committed prefix (stats.ComparePaired,
// anytime-valid, so judging it after every frame keeps its level) rejects "no difference" at
// Confidence. A false "shown" has probability at most 1 − Confidence per comparison.
type DiffShown struct {
	Confidence float64 // DefaultConfidence by default
}

// Shown ends a paired point once every variant's difference from the reference is shown.
func Shown() *DiffShown { return &DiffShown{Confidence: DefaultConfidence} }

// Level sets the confidence of the comparison.
func (r *DiffShown) Level(confidence float64) *DiffShown { r.Confidence = confidence; return r }

// Met is true once every comparison shows its difference (false on a point with none).
func (r *DiffShown) Met(p *Progress) bool {
	if len(p.Pairs) == 0 || r.Err() != nil {
		return false
	}
	for _, t := range p.Pairs {
		if !stats.ComparePaired(t, r.Confidence).Shown {
			return false
		}
	}
	return true
}

// Name is "shown".
func (r *DiffShown) Name() string { return "shown" }

// Err reports a confidence outside (0, 1).
func (r *DiffShown) Err() error { return checkConfidence("stop.Shown", r.Confidence) }

// RatioWithin ends a paired point once the ratio of every variant's BER to the reference's is
// known to within ±Fraction: its interval (stats.ComparePaired, at Confidence) lies within
// Fraction of the ratio on both sides. Within(0.1) stops when "B makes 0.62 times A's errors"
// is known to ±10 %, whether or not the two differ.
type RatioWithin struct {
	Fraction   float64
	Confidence float64 // DefaultConfidence by default
}

// Within ends a paired point once every ratio's interval lies within ±fraction of it.
func Within(fraction float64) *RatioWithin {
	return &RatioWithin{Fraction: fraction, Confidence: DefaultConfidence}
}

// Level sets the confidence of the ratio's interval.
func (r *RatioWithin) Level(confidence float64) *RatioWithin { r.Confidence = confidence; return r }

// Met is true once every ratio's interval is within Fraction of the ratio (false on a point
// with no comparison, or with a ratio not yet defined).
func (r *RatioWithin) Met(p *Progress) bool {
	if len(p.Pairs) == 0 || r.Err() != nil {
		return false
	}
	for _, t := range p.Pairs {
		c := stats.ComparePaired(t, r.Confidence)
		if !(c.Ratio > 0) || math.IsInf(c.Ratio, 0) || !(c.RatioLow >= c.Ratio*(1-r.Fraction)) || !(c.RatioHigh <= c.Ratio*(1+r.Fraction)) {
			return false
		}
	}
	return true
}

// Name is "within".
func (r *RatioWithin) Name() string { return "within" }

// Err reports a fraction outside (0, 1) or a confidence outside (0, 1).
func (r *RatioWithin) Err() error {
	if !(r.Fraction > 0 && r.Fraction < 1) {
		return fmt.Errorf("stop.Within: fraction %v must lie between 0 and 1 (0.1 for ±10 %%)", r.Fraction)
	}
	return checkConfidence("stop.Within", r.Confidence)
}
