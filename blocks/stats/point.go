package stats

import "tally/blocks/link"

// ForFrames is the estimate the engine reports for one tap of a finished point that counted
// t in frames equal frames.
//
// errorTarget > 0 says the point ended because this tap reached that many errors: that is
// inverse binomial sampling, and the estimate is InverseSampling's (Method
// "negative-binomial" for frames of one trial, "stagewise" for longer frames) whatever
// method is named, because the fixed-n methods are biased there. Otherwise the named method is used ("" is Default), which is exact for a point
// ended by a bit cap. An unknown method is an error even for a count that would not use it,
// so a script's mistake shows at once.
func ForFrames(t link.Tally, frames int64, confidence float64, method string, errorTarget int64) (Estimate, error) {
	m, err := MethodNamed(method)
	if err != nil {
		return Estimate{}, err
	}
	if errorTarget > 0 && t.Errors >= errorTarget {
		return InverseSampling(t.Errors, t.Trials, frames, errorTarget, confidence)
	}
	return m(t.Errors, t.Trials, confidence)
}

// ForPoint is ForFrames with the frames the tally counted (t.Frames). A tally without frame
// counts, or whose trials do not split evenly into them, is taken as stopped exactly at its
// last error (one trial per frame, target = errors counted): exact when the rule is judged
// after every trial, close when a frame holds few errors.
func ForPoint(t link.Tally, confidence float64, method string, errorTarget int64) (Estimate, error) {
	if errorTarget > 0 && t.Errors >= errorTarget && !(t.Frames > 0 && t.Trials%t.Frames == 0) {
		if _, err := MethodNamed(method); err != nil {
			return Estimate{}, err
		}
		return InverseSampling(t.Errors, t.Trials, t.Trials, t.Errors, confidence)
	}
	return ForFrames(t, t.Frames, confidence, method, errorTarget)
}
