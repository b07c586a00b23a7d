package stop

import (
	"fmt"

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

// RatioWithin ends a paired point (sim's Variants) once every variant is shown to make
// within ±Fraction of the reference's errors: the interval of the ratio of their BERs
// (stats.ComparePaired at Confidence, anytime-valid) lies inside [1 − Fraction, 1 + Fraction].
// Within(0.1) stops when "the two designs are within 10 % of each other" is shown: no
// difference that matters, rather than no difference shown.
//
// Given with Shown to the same experiment (x.Stop(stop.Shown(), stop.Within(0.1), …)), the
// two are judged per comparison: the point ends once every comparison is settled, shown
// different or shown within ±Fraction.
type RatioWithin struct {
	Fraction   float64
	Confidence float64 // DefaultConfidence by default
}

// Within ends a paired point once every variant's BER is shown within ±fraction of the
// reference's.
func Within(fraction float64) *RatioWithin {
	return &RatioWithin{Fraction: fraction, Confidence: DefaultConfidence}
}

// Level sets the confidence of the ratio's interval.
func (r *RatioWithin) Level(confidence float64) *RatioWithin { r.Confidence = confidence; return r }

// Met is true once every ratio's interval lies inside [1 − Fraction, 1 + Fraction] (false on a
// point with no comparison).
func (r *RatioWithin) Met(p *Progress) bool {
	if len(p.Pairs) == 0 || r.Err() != nil {
		return false
	}
	for _, t := range p.Pairs {
		if !stats.ComparePaired(t, r.Confidence).Within(r.Fraction) {
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
