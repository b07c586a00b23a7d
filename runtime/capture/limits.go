package capture

import (
	"fmt"

	"gonum.org/v1/gonum/stat/distuv"

	"tally/blocks/stats"
)

// One-sided limits of the exact (Clopper–Pearson) kind for k errors in n bits at confidence C
// (Clopper and Pearson, Biometrika 26, 1934), with Beta quantiles B⁻¹:
//
//	upper = B⁻¹(C; k+1, n−k)   (1 when k = n)
//	lower = B⁻¹(1−C; k, n−k+1) (0 when k = 0)
//
// The upper limit is the largest BER the count does not rule out at confidence C; with k = 0
// it is the familiar −ln(1−C)/n ≈ 3/n at 95 %. For C > ½ they are the ends of the two-sided
// Clopper–Pearson interval at confidence 2C − 1, so blocks/stats computes them with its care
// for counts past gonum's Beta range; for C ≤ ½, gonum's Beta quantile.
// The upper limit is the one tally interval prints (stats.UpperLimit), so the two commands
// agree on the lab's question.
func upperLimit(k, n int64, confidence float64) (float64, error) {
	if n <= 0 || k >= n {
		return 1, nil
	}
	return stats.UpperLimit(k, n, confidence) // the limit tally interval gives
}

func lowerLimit(k, n int64, confidence float64) (float64, error) {
	switch {
	case n <= 0 || k <= 0:
		return 0, nil
	case k >= n:
		e, err := stats.ClopperPearson(n, n, confidence) // one-sided at k = n
		return e.Low, err
	case confidence > 0.5:
		e, err := stats.ClopperPearson(k, n, 2*confidence-1)
		return e.Low, err
	}
	return betaQuantile(1-confidence, float64(k), float64(n-k+1))
}

func betaQuantile(q, a, b float64) (v float64, err error) {
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("cannot compute the limit for these counts (%v)", r)
		}
	}()
	return distuv.Beta{Alpha: a, Beta: b}.Quantile(q), nil
}
