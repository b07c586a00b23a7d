package stats

// ClopperPearson is the exact binomial interval (Clopper and Pearson, Biometrika 26, 1934),
// written with Beta quantiles B⁻¹(q; a, b):
//
//	low  = B⁻¹(α/2; k, n−k+1)
//	high = B⁻¹(1−α/2; k+1, n−k)
//
// with α = 1 − confidence and rate k/n. With k = 0 the upper limit is one-sided,
// B⁻¹(1−α; 1, n) = 1 − α^(1/n) (≈ 3/n at 95 %, the rule of three), and low = 0; k = n
// mirrors it. Its coverage is never below the confidence, at the price of some width.
func ClopperPearson(k, n int64, confidence float64) (Estimate, error) {
	return betaInterval("clopper-pearson", k, n, confidence, func(k, n float64) (low, high [2]float64) {
		return [2]float64{k, n - k + 1}, [2]float64{k + 1, n - k}
	})
}
