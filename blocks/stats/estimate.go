// Package stats turns error counts into estimates and confidence intervals.
package stats

import (
	"fmt"

	"gonum.org/v1/gonum/stat/distuv"
)

// Estimate is a rate with its confidence interval.
type Estimate struct {
	Rate   float64 // point estimate
	Low    float64 // lower confidence limit
	High   float64 // upper confidence limit
	Method string  // interval method, as recorded in run.json
}

// ClopperPearson is the exact binomial interval (Clopper and Pearson, Biometrika, 1934) from
// Beta quantiles: low = B⁻¹(α/2; k, n−k+1), high = B⁻¹(1−α/2; k+1, n−k). With k = 0 the upper
// limit is one-sided, B⁻¹(1−α; 1, n), and low = 0.
func ClopperPearson(k, n int64, confidence float64) (Estimate, error) {
	if err := checkCount(k, n, confidence); err != nil {
		return Estimate{}, err
	}
	e := Estimate{Method: "clopper-pearson"}
	if n == 0 {
		return Estimate{Rate: 0, Low: 0, High: 1, Method: e.Method}, nil
	}
	alpha := 1 - confidence
	e.Rate = float64(k) / float64(n)
	kf, nf := float64(k), float64(n)
	switch {
	case k == 0:
		e.High = distuv.Beta{Alpha: 1, Beta: nf}.Quantile(1 - alpha)
	case k == n:
		e.Low = distuv.Beta{Alpha: kf, Beta: 1}.Quantile(alpha)
		e.High = 1
	default:
		e.Low = distuv.Beta{Alpha: kf, Beta: nf - kf + 1}.Quantile(alpha / 2)
		e.High = distuv.Beta{Alpha: kf + 1, Beta: nf - kf}.Quantile(1 - alpha/2)
	}
	return e, nil
}

func checkCount(k, n int64, confidence float64) error {
	switch {
	case k < 0 || n < 0:
		return fmt.Errorf("counts must not be negative (errors %d, trials %d)", k, n)
	case k > n:
		return fmt.Errorf("errors %d exceed trials %d", k, n)
	case !(confidence > 0 && confidence < 1):
		return fmt.Errorf("confidence %v must lie strictly between 0 and 1", confidence)
	}
	return nil
}
