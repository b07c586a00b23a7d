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
func Jeffreys(k, n int64, confidence float64) (e Estimate, err error) {
	defer numeric(&e, &err)
	const method = "jeffreys"
	if err := checkCount(k, n, confidence); err != nil {
		return Estimate{}, err
	}
	if n == 0 {
		return none(method), nil
	}
	alpha := 1 - confidence
	kf, nf := float64(k), float64(n)
	a, b := kf+0.5, nf-kf+0.5 // the posterior Beta(a, b)
	e = Estimate{Rate: kf / nf, Method: method}
	switch {
	case k == 0:
		e.High = betaQuantile(1-alpha, a, b)
	case k == n:
		e.Low = betaQuantile(alpha, a, b)
		e.High = 1
	default:
		e.Low = betaQuantile(alpha/2, a, b)
		e.High = betaQuantile(1-alpha/2, a, b)
	}
	e.Low, e.High = clamp(e.Low), clamp(e.High)
	return e, nil
}
