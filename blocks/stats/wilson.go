package stats

import (
	"math"

	"gonum.org/v1/gonum/stat/distuv"
)

// Wilson is the score interval (Wilson, J. Am. Stat. Assoc. 22, 1927): the p for which the
// normal score test of k/n does not reject,
//
//	centre    = (p̂ + z²/2n) / (1 + z²/n)
//	halfwidth = z / (1 + z²/n) · √(p̂(1−p̂)/n + z²/4n²)
//
// with p̂ = k/n and z the standard normal quantile at 1 − α/2. With k = 0 (or k = n) the
// bound is one-sided, z at 1 − α: high = z²/(n + z²). Narrower than Clopper–Pearson; its
// coverage dips below the confidence for some p, most for rates near 0 with few errors
// (Brown, Cai and DasGupta, Statistical Science 16, 2001).
func Wilson(k, n int64, confidence float64) (e Estimate, err error) {
	defer numeric(&e, &err)
	const method = "wilson"
	if err := checkCount(k, n, confidence); err != nil {
		return Estimate{}, err
	}
	if n == 0 {
		return none(method), nil
	}
	alpha := 1 - confidence
	q := 1 - alpha/2
	if k == 0 || k == n {
		q = 1 - alpha
	}
	z := distuv.UnitNormal.Quantile(q)
	nf := float64(n)
	p := float64(k) / nf
	z2 := z * z
	centre := (p + z2/(2*nf)) / (1 + z2/nf)
	half := z / (1 + z2/nf) * math.Sqrt(p*(1-p)/nf+z2/(4*nf*nf))
	e = Estimate{Rate: p, Low: clamp(centre - half), High: clamp(centre + half), Method: method}
	switch k {
	case 0:
		e.Low = 0
	case n:
		e.High = 1
	}
	return e, nil
}
