package compare

import (
	"math"
	"sort"
)

// Holm adjusts the p-values of several tests for their number by Holm's step-down procedure
// (Holm, "A simple sequentially rejective multiple test procedure", Scand. J. Statist. 6,
// 1979): with the p-values sorted, the i-th smallest (i from 0) becomes the largest of
// (m−j)·p₍ⱼ₎ for j ≤ i, capped at 1. Rejecting where the adjusted value is at most alpha keeps
// the chance of any false rejection among the m at alpha; comparing every point of a sweep at
// alpha on its own would flag one point in twenty by chance alone.
func Holm(p []float64) []float64 {
	idx := make([]int, len(p))
	for i := range idx {
		idx[i] = i
	}
	sort.SliceStable(idx, func(a, b int) bool { return p[idx[a]] < p[idx[b]] })
	adj := make([]float64, len(p))
	m, run := len(p), 0.0
	for i, k := range idx {
		run = math.Max(run, math.Min(1, float64(m-i)*p[k]))
		adj[k] = run
	}
	return adj
}
