package stats_test

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/stat"
	"gonum.org/v1/gonum/stat/distuv"

	"tally/blocks/link"
	"tally/blocks/rng"
	"tally/blocks/stats"
)

// Weighted against the textbook t interval on the per-frame rates computed with gonum's
// stat.MeanStdDev (the sample mean and standard deviation) and distuv.StudentsT: the
// frame sums enter the tally one frame at a time, as the engine adds them.
func TestWeightedAgainstGonum(t *testing.T) {
	r := rng.New(9)
	const frames, m = 40, 1000
	var sum link.Tally
	rates := make([]float64, frames)
	for f := range frames {
		var c link.Tally
		c.Trials, c.Estimator = m, link.Importance
		for range 5 {
			w := 1e-9 * math.Exp(r.Norm())
			c.Weight += w
			c.WeightSquares += w * w
			c.Errors++
		}
		rates[f] = c.Weight / m
		sum.Add(c)
	}
	e, err := stats.Weighted(sum, 0.95)
	if err != nil {
		t.Fatal(err)
	}
	mean, sd := stat.MeanStdDev(rates, nil)
	half := distuv.StudentsT{Mu: 0, Sigma: 1, Nu: frames - 1}.Quantile(0.975) * sd / math.Sqrt(frames)
	if rel(e.Rate, mean) > 1e-12 || rel(e.Low, mean-half) > 1e-9 || rel(e.High, mean+half) > 1e-9 {
		t.Errorf("got %.10g [%.10g, %.10g], want %.10g [%.10g, %.10g]", e.Rate, e.Low, e.High, mean, mean-half, mean+half)
	}
	if e.Method != "importance-sampling+t" || e.Degenerate {
		t.Errorf("method %q, degenerate %v", e.Method, e.Degenerate)
	}
	// Kish's effective sample size (Σw)²/Σw² is at most the number of weights, 200.
	if !(e.Effective > 1 && e.Effective <= 200) {
		t.Errorf("effective sample size %v", e.Effective)
	}
	// One weight carrying the sum degenerates.
	one := link.Tally{Trials: 1e6, Frames: 100, Estimator: link.Importance, Weight: 1e-3, WeightSquares: 1e-6, FrameWeights: 1e-6}
	if e, _ := stats.Weighted(one, 0.95); !e.Degenerate || e.Effective != 1 {
		t.Errorf("a single weight: effective %v, degenerate %v", e.Effective, e.Degenerate)
	}
}

func rel(a, b float64) float64 { return math.Abs(a-b) / math.Abs(b) }
