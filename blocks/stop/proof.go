package stop

import (
	"fmt"
	"math"

	"tally/blocks/link"
	"tally/blocks/stats"
)

// DefaultConfidence is the confidence of the rules that judge an interval or make a claim
// (Precision, Below, Above) unless set.
const DefaultConfidence = 0.95

// ShownBelow ends a point once its rate is shown below Target: the chance that a point whose
// rate is not below Target ever ends this way is at most 1 − Confidence, however long it
// runs and however its errors cluster within frames (bursts, decoder error events, cycle
// slips), since the rule is judged after every frame on a test that allows for both. It
// assumes only that frames are independent, which the engine guarantees.
// The test holds for counted errors only: on a tap estimated with weights (link.Estimator)
// it is never met, since no test of ours stays valid there under repeated looks.
//
// Why not "the interval's High < Target": each look at a fixed-n interval is one more chance
// of a false claim (repeated significance tests; Armitage, McPherson and Rowe, J. R. Stat.
// Soc. A 132, 1969). For a rate equal to the target, judged after each of 10 000 frames,
// "High < target or Low > target" at 95 % ends about half of the points (our runs of it),
// not 5 %. And why not a test on bits taken as independent (a likelihood ratio on the bit
// count, stats.Evidence): with errors in bursts of 20 bits at twice the target it claims
// "below" on most points, before the first burst comes.
//
// The rule is stats.FrameEvidence ≥ ln(1/(1−Confidence)): a supermartingale on the frames'
// error counts with Ville's inequality; see there for the model and the method.
//
// The price of assuming nothing about clustering: with no errors the claim needs about
// 3.7/Target frames at 95 % (a frame could be one that fails whole), so short frames, or the
// frame tap, claim "below" soonest. A point that ends on a bit or time cap claims nothing:
// its stop word says only that the cap was reached.
type ShownBelow struct {
	Target     float64 // rate to be shown below, in (0, 1)
	On         string  // tap; link.TapBER by default
	Confidence float64 // 1 − the chance of a false claim, in (0, 1); DefaultConfidence by default
}

// Below ends a point once its rate is shown below target at 95 % on the BER tap.
func Below(target float64) *ShownBelow {
	return &ShownBelow{Target: target, On: link.TapBER, Confidence: DefaultConfidence}
}

// Tap makes the rule judge another tap, for example link.TapFER.
func (r *ShownBelow) Tap(name string) *ShownBelow { r.On = name; return r }

// Level sets the confidence of the claim, in (0, 1).
func (r *ShownBelow) Level(confidence float64) *ShownBelow { r.Confidence = confidence; return r }

// Met is true once the frame-level evidence M for a rate below Target reaches
// 1/(1 − Confidence).
func (r *ShownBelow) Met(p *Progress) bool {
	t, _ := p.Tap(r.On)
	return r.Err() == nil && t.Estimator == link.Count && Evidence(t, r.Target, true) >= -math.Log(1-r.Confidence)
}

// Name is "below" (or "<tap>_below").
func (r *ShownBelow) Name() string { return tapName(r.On, "below") }

// Err reports a target outside (0, 1) and a confidence outside (0, 1).
func (r *ShownBelow) Err() error {
	if err := checkRate("stop.Below", r.Target); err != nil {
		return err
	}
	return checkConfidence("stop.Below", r.Confidence)
}

// ShownAbove ends a point once its rate is shown above Target: the chance that a point whose
// rate is not above Target ever ends this way is at most 1 − Confidence, however long it runs
// and however its errors cluster within frames. It is ShownBelow's frame-level test in the
// other direction; with errors it needs about the bits a test on independent bits needs,
// more in proportion to the clustering.
type ShownAbove struct {
	Target     float64 // rate to be shown above, in (0, 1)
	On         string  // tap; link.TapBER by default
	Confidence float64 // 1 − the chance of a false claim, in (0, 1); DefaultConfidence by default
}

// Above ends a point once its rate is shown above target at 95 % on the BER tap.
func Above(target float64) *ShownAbove {
	return &ShownAbove{Target: target, On: link.TapBER, Confidence: DefaultConfidence}
}

// Tap makes the rule judge another tap, for example link.TapFER.
func (r *ShownAbove) Tap(name string) *ShownAbove { r.On = name; return r }

// Level sets the confidence of the claim, in (0, 1).
func (r *ShownAbove) Level(confidence float64) *ShownAbove { r.Confidence = confidence; return r }

// Met is true once the frame-level evidence M for a rate above Target reaches
// 1/(1 − Confidence).
func (r *ShownAbove) Met(p *Progress) bool {
	t, _ := p.Tap(r.On)
	return r.Err() == nil && t.Estimator == link.Count && Evidence(t, r.Target, false) >= -math.Log(1-r.Confidence)
}

// Name is "above" (or "<tap>_above").
func (r *ShownAbove) Name() string { return tapName(r.On, "above") }

// Err reports a target outside (0, 1) and a confidence outside (0, 1).
func (r *ShownAbove) Err() error {
	if err := checkRate("stop.Above", r.Target); err != nil {
		return err
	}
	return checkConfidence("stop.Above", r.Confidence)
}

// Evidence is stats.FrameEvidence for a tap's counts: the log evidence that its rate lies
// below (below true) or above target, which Below and Above compare with
// ln(1/(1−Confidence)).
func Evidence(t link.Tally, target float64, below bool) float64 {
	return stats.FrameEvidence(t, target, below)
}

// Method names the test behind a claim of Below or Above, for the run record.
func (r *ShownBelow) Method() string { return claimMethod(r.Confidence) }

// Method names the test behind a claim of Below or Above, for the run record.
func (r *ShownAbove) Method() string { return claimMethod(r.Confidence) }

func claimMethod(confidence float64) string {
	return fmt.Sprintf("%s, at %g %% confidence", stats.FrameEvidenceMethod, 100*confidence)
}

func checkRate(rule string, target float64) error {
	if !(target > 0 && target < 1) {
		return fmt.Errorf("%s: target %v must lie strictly between 0 and 1", rule, target)
	}
	return nil
}

func checkConfidence(rule string, confidence float64) error {
	if !(confidence > 0 && confidence < 1) {
		return fmt.Errorf("%s: confidence %v must lie strictly between 0 and 1", rule, confidence)
	}
	return nil
}
