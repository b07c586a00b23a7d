package theory

import "math"

// EbN0For is the Eb/N0 in dB at which the error-rate curve ber falls to target, for example
// theory.EbN0For(1e-5, theory.BPSK) ≈ 9.6 dB. ber must decrease with Eb/N0 (every curve of
// this package does). The root is found by bisection on log(ber) between −20 and 60 dB, to
// 1e-9 dB; NaN when target is not a rate in (0, 1) or the curve does not cross it there.
//
// (gonum has no scalar root finder; bisection is enough for a monotone curve.)
func EbN0For(target float64, ber func(ebn0DB float64) float64) float64 {
	if !(target > 0 && target < 1) {
		return math.NaN()
	}
	lt := math.Log(target)
	g := func(db float64) float64 { return math.Log(ber(db)) - lt }
	lo, hi := -20.0, 60.0
	glo, ghi := g(lo), g(hi)
	if math.IsNaN(glo) || math.IsNaN(ghi) || glo < 0 || ghi > 0 {
		return math.NaN()
	}
	for hi-lo > 1e-9 {
		mid := 0.5 * (lo + hi)
		gm := g(mid)
		if math.IsNaN(gm) {
			return math.NaN()
		}
		if gm > 0 {
			lo = mid
		} else {
			hi = mid
		}
	}
	return 0.5 * (lo + hi)
}
