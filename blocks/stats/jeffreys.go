package stats

// Jeffreys is the equal-tailed interval of the Beta(k+½, n−k+½) posterior under Jeffreys'
// prior, as recommended by Brown, Cai and DasGupta (Statistical Science 16, 2001, sec. 4.1.2):
//
//	low  = B⁻¹(α/2; k+½, n−k+½)
//	high = B⁻¹(1−α/2; k+½, n−k+½)
//
// with their modification at the ends: k = 0 gives low = 0 and a one-sided upper limit
// B⁻¹(1−α; ½, n+½); k = n mirrors it. Close to nominal coverage on average, narrower than
// Clopper–Pearson, but not guaranteed at every p.
func Jeffreys(k, n int64, confidence float64) (Estimate, error) {
	return betaInterval("jeffreys", k, n, confidence, func(k, n float64) (low, high [2]float64) {
		post := [2]float64{k + 0.5, n - k + 0.5} // the posterior Beta(a, b)
		return post, post
	})
}
