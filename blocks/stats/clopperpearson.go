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
func ClopperPearson(k, n int64, confidence float64) (e Estimate, err error) {
	defer numeric(&e, &err)
	const method = "clopper-pearson"
	if err := checkCount(k, n, confidence); err != nil {
		return Estimate{}, err
	}
	if n == 0 {
		return none(method), nil
	}
	alpha := 1 - confidence
	kf, nf := float64(k), float64(n)
	e = Estimate{Rate: kf / nf, Method: method}
	switch {
	case k == 0:
		e.High = betaQuantile(1-alpha, 1, nf)
	case k == n:
		e.Low = betaQuantile(alpha, kf, 1)
		e.High = 1
	default:
		e.Low = betaQuantile(alpha/2, kf, nf-kf+1)
		e.High = betaQuantile(1-alpha/2, kf+1, nf-kf)
	}
	e.Low, e.High = clamp(e.Low), clamp(e.High)
	return e, nil
}
