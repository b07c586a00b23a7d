package stats

// PLACEHOLDER until branch h15stats lands: the announced API, crude inside. Removed at merge.

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/stat/distuv"
)

type PairedTally struct {
	Frames             int64
	TrialsA, TrialsB   int64
	ErrorsA, ErrorsB   int64
	OnlyA, OnlyB       int64
	SquaresA, SquaresB int64
	Cross              int64
}

func (t *PairedTally) Add(errA, errB, trialsA, trialsB, onlyA, onlyB int64) {
	t.Frames++
	t.TrialsA += trialsA
	t.TrialsB += trialsB
	t.ErrorsA += errA
	t.ErrorsB += errB
	t.OnlyA += onlyA
	t.OnlyB += onlyB
	t.SquaresA += errA * errA
	t.SquaresB += errB * errB
	t.Cross += errA * errB
}

func (t *PairedTally) Merge(u PairedTally) {
	t.Frames += u.Frames
	t.TrialsA += u.TrialsA
	t.TrialsB += u.TrialsB
	t.ErrorsA += u.ErrorsA
	t.ErrorsB += u.ErrorsB
	t.OnlyA += u.OnlyA
	t.OnlyB += u.OnlyB
	t.SquaresA += u.SquaresA
	t.SquaresB += u.SquaresB
	t.Cross += u.Cross
}

type Comparison struct {
	RateA, RateB               float64
	Diff, DiffLow, DiffHigh    float64
	Ratio, RatioLow, RatioHigh float64
	P                          float64
	Shown                      bool
	Verdict                    string
	Method                     string
}

func (c Comparison) VerdictFor(a, b string) string {
	if !c.Shown {
		return "no difference shown between " + a + " and " + b + ", p = " + FormatP(c.P)
	}
	if c.Diff < 0 {
		return b + " makes fewer errors than " + a + ", p = " + FormatP(c.P)
	}
	return b + " makes more errors than " + a + ", p = " + FormatP(c.P)
}

func ComparePaired(t PairedTally, confidence float64) Comparison {
	n := float64(t.TrialsA)
	c := Comparison{Method: "placeholder"}
	if n == 0 || t.Frames == 0 {
		c.RateA, c.RateB, c.Diff, c.DiffLow, c.DiffHigh, c.Ratio, c.RatioLow, c.RatioHigh, c.P = math.NaN(), math.NaN(), math.NaN(), math.NaN(), math.NaN(), math.NaN(), math.NaN(), math.NaN(), 1
		return c
	}
	c.RateA, c.RateB = float64(t.ErrorsA)/n, float64(t.ErrorsB)/n
	c.Diff = c.RateB - c.RateA
	m := float64(t.Frames)
	sd := float64(t.SquaresA + t.SquaresB - 2*t.Cross)
	d := float64(t.ErrorsB - t.ErrorsA)
	v := (sd - d*d/m) * m / math.Max(m-1, 1)
	z := distuv.UnitNormal.Quantile(1 - (1-confidence)/2)
	se := math.Sqrt(math.Max(v, 0)) / n
	c.DiffLow, c.DiffHigh = c.Diff-z*se, c.Diff+z*se
	c.Ratio = c.RateB / c.RateA
	c.RatioLow, c.RatioHigh = (c.RateA+c.DiffLow)/c.RateA, (c.RateA+c.DiffHigh)/c.RateA
	if se > 0 {
		c.P = 2 * distuv.UnitNormal.Survival(math.Abs(c.Diff)/se)
	} else {
		c.P = 1
	}
	c.Shown = c.P < 1-confidence
	c.Verdict = c.VerdictFor("A", "B")
	return c
}

func FormatP(p float64) string {
	if p < 1e-300 {
		return "p < 1e-300"
	}
	return fmt.Sprintf("%.2g", p)
}
