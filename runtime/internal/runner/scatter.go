package runner

import (
	"fmt"

	"tally/blocks/link"
	"tally/runtime/result"
)

// Scatter asks for a constellation plot (scatter.svg, scatter.png) of the first frame of the
// point whose parameters have these values, in sweep order (Scatter(12) on an Eb/N0 sweep;
// Scatter(12, 1) on a grid): the samples as the last block of the link left them, over the
// modulator's points.
func (x *experiment) Scatter(values ...float64) *experiment {
	if len(values) == 0 {
		Fail(fmt.Errorf("sim.Scatter: name the point by its swept values"))
	}
	x.ScatterAt = append([]float64(nil), values...)
	return x
}

// scatter runs frame 0 of the chosen point again, alone, and keeps its samples. The frame's
// streams are keyed as in the run, so it is the same frame the run counted.
func (x *experiment) scatter(run *result.Run, points []Point, seed uint64) error {
	if x.ScatterAt == nil {
		return nil
	}
	var pt *Point
	for i := range points {
		if matches(points[i].Values, x.ScatterAt) {
			pt = &points[i]
			break
		}
	}
	if pt == nil {
		return fmt.Errorf("sim.Scatter: no point of the sweep has the values %v", x.ScatterAt)
	}
	l := x.Build(*pt)
	x.fit(*pt, l)
	var f link.Frame
	counts := make([]link.Tally, len(l.Taps()))
	if err := l.Run(&f, seed, pt.Index, 0, counts); err != nil {
		return fmt.Errorf("sim.Scatter: %w", err)
	}
	run.Scatter = &result.Scatter{Point: pt.Index, Label: pt.text(),
		Received: append([]complex128(nil), f.Samples...), Ideal: append([]complex128(nil), f.Constellation...)}
	return nil
}

func matches(have, want []float64) bool {
	if len(want) > len(have) {
		return false
	}
	for i, w := range want {
		if have[i] != w {
			return false
		}
	}
	return true
}
