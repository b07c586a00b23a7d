package stop

import (
	"fmt"
	"math"

	"tally/blocks/link"
	"tally/blocks/stats"
)

// interval is the tap's interval by the named method, and false when it must not be judged:
// no trials counted yet (a 0-bit state says nothing) or a bad setting (Err reports it before
// the run). A tap estimated with weights gives stats.Weighted's interval, and false while its
// weights are degenerate or the tap is not estimated.
func interval(p *Progress, tap, method string, confidence float64) (stats.Estimate, bool) {
	t, _ := p.Tap(tap)
	if t.Trials <= 0 || t.Estimator == link.Unestimated {
		return stats.Estimate{}, false
	}
	if t.Estimator != link.Count {
		w, err := stats.Weighted(t, confidence)
		return w.Estimate, err == nil && !w.Degenerate
	}
	e, err := stats.Interval(method, t.Errors, t.Trials, confidence)
	return e, err == nil
}

// tapName is word on the BER tap and "<tap>_word" on another.
func tapName(tap, word string) string {
	if tap == link.TapBER || tap == "" {
		return word
	}
	return tap + "_" + word
}

func checkJudged(rule string, confidence float64, method string) error {
	if err := checkConfidence(rule, confidence); err != nil {
		return err
	}
	if _, err := stats.MethodNamed(method); err != nil {
		return fmt.Errorf("%s: %w", rule, err)
	}
	return nil
}

// WidthRatio ends a point once its interval is narrow relative to the rate: High/Low ≤ Ratio
// at confidence Confidence. Ratio 4 is about 10 errors and 1.5 about 100 at 95 % (the
// interval spans about 0.5× to 2× the rate at 10 errors and 0.8× to 1.2× at 100; common
// practice, no source). With no errors Low is 0 and the rule is not met.
type WidthRatio struct {
	Ratio      float64 // largest High/Low accepted, > 1
	On         string  // tap; link.TapBER by default
	Confidence float64 // in (0, 1); DefaultConfidence by default
	Method     string  // interval method (stats.MethodNamed); "" is stats.Default
}

// Precision ends a point once High/Low ≤ ratio at 95 % confidence on the BER tap.
func Precision(ratio float64) *WidthRatio {
	return &WidthRatio{Ratio: ratio, On: link.TapBER, Confidence: DefaultConfidence}
}

// Tap makes the rule judge another tap, for example link.TapFER.
func (r *WidthRatio) Tap(name string) *WidthRatio { r.On = name; return r }

// Level sets the confidence of the interval judged, in (0, 1).
func (r *WidthRatio) Level(confidence float64) *WidthRatio { r.Confidence = confidence; return r }

// Met is true once High/Low ≤ Ratio.
func (r *WidthRatio) Met(p *Progress) bool {
	e, ok := interval(p, r.On, r.Method, r.Confidence)
	return ok && e.Low > 0 && e.High/e.Low <= r.Ratio
}

// Name is "precision" (or "<tap>_precision" off the BER tap).
func (r *WidthRatio) Name() string { return tapName(r.On, "precision") }

// Err reports a ratio not above 1 and a bad confidence or method.
func (r *WidthRatio) Err() error {
	if !(r.Ratio > 1) || math.IsInf(r.Ratio, 1) {
		return fmt.Errorf("stop.Precision: ratio %v must be a finite number above 1", r.Ratio)
	}
	return checkJudged("stop.Precision", r.Confidence, r.Method)
}
