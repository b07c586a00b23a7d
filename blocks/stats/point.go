package stats

import "tally/blocks/link"

// ForPoint is the estimate the engine reports for one tap of a finished point.
// errorTarget > 0 says the point ended because this tap reached that many errors (inverse
// binomial sampling), which needs an interval valid under that stop rule.
func ForPoint(t link.Tally, confidence float64, method string, errorTarget int64) (Estimate, error) {
	return ClopperPearson(t.Errors, t.Trials, confidence)
}
