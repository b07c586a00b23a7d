package stats

import (
	"math"

	"tally/blocks/link"
)

// FrameEvidenceMethod names FrameEvidence in run records.
const FrameEvidenceMethod = "frame-level anytime test (Fan-Grama-Liu supermartingale, mixture over λ), valid for errors clustered in any way within frames"

// FrameEvidence is the log of an anytime-valid evidence M that the rate of a tally lies
// below target (below true) or above it, built on the frames' error counts, so that it stays
// valid however the errors cluster within a frame (bursts, decoder error events, slips):
// it assumes only that frames are independent and alike, which the engine guarantees (each
// frame draws from its own streams, and blocks keep no state from frame to frame).
//
// With X_f = e_f/m ∈ [0, 1] the share of frame f's m trials in error and p = E X_f the rate,
// take ξ_f = (t − X_f)/(1 − t) for below (H₀: p ≥ t) and ξ_f = (X_f − t)/t for above
// (H₀: p ≤ t). Both are ≥ −1 and have E ξ_f ≤ 0 under H₀, so for each λ in [0, 1)
//
//	L_λ = exp(λ·Σξ_f − ψ(λ)·Σξ_f²),  ψ(λ) = −ln(1−λ) − λ,
//
// is a nonnegative supermartingale from 1 under H₀ (Fan, Grama and Liu, "Exponential
// inequalities for martingales with applications", Electron. J. Probab. 20, 2015, Lemma 4.1:
// exp(λx − ψ(λ)x²) ≤ 1 + λx for x ≥ −1; Howard, Ramdas, McAuliffe and Sekhon, "Time-uniform
// Chernoff bounds via nonnegative supermartingales", Probab. Surveys 17, 2020, §2). So is
// the mixture M = Σ w_j L_λj over a fixed grid of λ with weights summing to 1, and by
// Ville's inequality P(M ever ≥ 1/α) ≤ α. Σξ and Σξ² need only the tally's sums (errors and
// the sum of squared errors per frame), so a replay of the committed counts decides the same.
//
// The variance term Σξ² grows with the spread of errors between frames, which is how the
// observed clustering slows a claim down. The price of asking nothing of the clustering is
// paid by "below" claims: with no errors, a frame could still be one that fails whole, so the
// claim needs about 3.7/t frames at 95 % (not bits): as many as a count of frames would.
// Above claims come after about as many bits as the bit-level test needs when errors are
// independent, and later in proportion to the clustering.
//
// Grid: for below, λ = 0.99 with weight 1/2 (nearly always the best bet: the bet is bounded
// by the worst frame) and λ = 2^−j, j = 1…20, sharing the other half; for above,
// λ = 0.99·2^−j, j = 0…39, equal weights. It is 0 for no frames, and
// NaN for a target outside (0, 1), counts that are not counts or trials that do not split
// evenly into frames.
func FrameEvidence(t link.Tally, target float64, below bool) float64 {
	switch {
	case !(target > 0 && target < 1) || t.Errors < 0 || t.Errors > t.Trials || t.Frames < 0:
		return math.NaN()
	case t.Frames == 0:
		return 0
	case t.Trials%t.Frames != 0:
		return math.NaN()
	}
	n := float64(t.Frames)
	m := float64(t.Trials / t.Frames)
	sx := float64(t.Errors) / m                 // Σ X_f
	sxx := float64(t.Squares) / (m * m)         // Σ X_f²
	dev2 := sxx - 2*target*sx + n*target*target // Σ (X_f − t)²
	dev2 = math.Max(dev2, 0)
	var s, v float64
	if below {
		c := 1 - target
		s, v = (n*target-sx)/c, dev2/(c*c)
	} else {
		s, v = (sx-n*target)/target, dev2/(target*target)
	}
	grid := aboveBets
	if below {
		grid = belowBets
	}
	// ln Σ w·exp(a), kept finite by factoring out the largest exponent.
	var buf [64]float64
	terms := buf[:len(grid)]
	top := math.Inf(-1)
	for i, b := range grid {
		terms[i] = b.logWeight + b.lambda*s - b.psi*v
		top = math.Max(top, terms[i])
	}
	var sum float64
	for _, a := range terms {
		sum += math.Exp(a - top)
	}
	return top + math.Log(sum)
}

// bet is one λ of the mixture, with its weight's log and ψ(λ).
type bet struct{ lambda, logWeight, psi float64 }

func newBet(lambda, weight float64) bet {
	return bet{lambda, math.Log(weight), -math.Log1p(-lambda) - lambda}
}

var belowBets, aboveBets = func() (below, above []bet) {
	below = append(below, newBet(0.99, 0.5))
	for j := 1; j <= 20; j++ {
		below = append(below, newBet(math.Ldexp(1, -j), 0.5/20))
	}
	for j := range 40 {
		above = append(above, newBet(0.99*math.Ldexp(1, -j), 1.0/40))
	}
	return below, above
}()
