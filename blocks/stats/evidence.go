package stats

import "math"

// Evidence is the log of the mixture likelihood ratio that a rate lies below target (below
// true) or above it, for k errors in n trials taken as independent. Errors that cluster
// (bursts, decoder error events) break that assumption and with it the level of a claim:
// the stop rules use FrameEvidence, which does not need it. It starts at 0 (no trials: no evidence) and
// by Ville's inequality (Ville, Étude critique de la notion de collectif, 1939)
//
//	P(Evidence ever ≥ ln(1/α)) ≤ α
//
// over the whole growing count, when the true rate is not on the claimed side. Judged after
// every frame, "Evidence ≥ ln(1/α)" is therefore a claim at level 1−α however long the count
// runs, which a fixed-n interval is not (Armitage, McPherson and Rowe, J. R. Stat. Soc. A
// 132, 1969). This is Robbins' method of mixtures (Robbins, "Statistical methods related
// to the law of the iterated logarithm", Ann. Math. Statist. 41, 1970): with t = target,
//
//	M = ∫ [q^k (1−q)^(n−k)] / [t^k (1−t)^(n−k)] π(q) dq
//
// over q in (0, t) for below, (t, 1) for above, with π the Beta(1, 1/t) density (mean near
// t) cut to that side and renormalised. For any true rate on the other side each q's ratio
// is a nonnegative supermartingale from 1, and so is M. In closed form, with the posterior
// Beta(k+1, n−k+1/t),
//
//	ln M = ln(1/t) + ln B(k+1, n−k+1/t) − k·ln t − (n−k)·ln(1−t) + ln P_post(side) − ln P_prior(side)
//
// It is NaN for a target outside (0, 1) or counts that are not counts.
func Evidence(k, n int64, target float64, below bool) float64 {
	switch {
	case !(target > 0 && target < 1) || k < 0 || k > n:
		return math.NaN()
	case n == 0:
		return 0
	}
	kf, nf, b := float64(k), float64(n), 1/target
	m := nf - kf + b // posterior Beta(k+1, m)
	lb, _ := math.Lgamma(kf + 1)
	lbeta := lb - lgammaRatio(m, kf+1) // ln B(k+1, m) = ln Γ(k+1) + ln Γ(m) − ln Γ(m+k+1)
	l1t := math.Log1p(-target)
	ln := math.Log(b) + lbeta - kf*math.Log(target) - (nf-kf)*l1t
	post := betaTail(target, kf+1, m, !below)
	var prior float64 // P(q < t) = 1 − (1−t)^b under Beta(1, b)
	if below {
		prior = -math.Expm1(b * l1t)
	} else {
		prior = math.Exp(b * l1t)
	}
	// A posterior share this small lies past what the incomplete beta routine resolves
	// (gonum returns subnormal values there that are not the tail), and the counts lie far on
	// the other side of the target, where M ≤ 1: no evidence.
	if post < 1e-290 {
		return math.Inf(-1)
	}
	return ln + math.Log(post) - math.Log(prior)
}
