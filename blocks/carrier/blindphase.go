package carrier

import (
	"fmt"
	"math"
	"slices"

	"tally/blocks/link"
	"tally/blocks/rng"
)

// BlindPhaseSearch is the blind phase search estimator of Pfau, Hoffmann and Noé,
// "Hardware-efficient coherent digital receiver concept with feedforward carrier recovery for
// M-QAM constellations", J. Lightwave Technol., 2009. Each symbol is turned by B test phases
//
//	φ_b = (b/B − 1/2)·2π/S,   b = 0 … B−1,
//
// spanning one symmetry period 2π/S; for each the squared distance to the nearest
// constellation point is summed over a window of L symbols around symbol k, and the test
// phase with the smallest sum is the estimate (θ̂_k = −φ_b), known modulo 2π/S, then unwrapped
// (package doc). It works on any constellation: S = 4 suits square QAM and QPSK. The
// resolution is 2π/(S·B); Pfau et al. find B = 32 test phases enough for 16-QAM.
type BlindPhaseSearch struct {
	Window   int // L, symbols in the sliding window (centred; truncated at the frame's ends)
	Tests    int // B, test phases per symmetry period
	Symmetry int // S, rotational symmetry of the constellation

	d    []float64
	pre  []float64
	best []float64
	est  []float64
	s    slicer
}

// BlindPhase is blind phase search over a window of window symbols with tests test phases,
// for a constellation of four-fold symmetry.
func BlindPhase(window, tests int) *BlindPhaseSearch {
	return &BlindPhaseSearch{Window: window, Tests: tests, Symmetry: 4}
}

// Symmetric sets the constellation's rotational symmetry S (8 for 8-PSK, say).
func (b *BlindPhaseSearch) Symmetric(s int) *BlindPhaseSearch { b.Symmetry = s; return b }

// Name is "carrier.BlindPhase".
func (b *BlindPhaseSearch) Name() string { return "carrier.BlindPhase" }

// Err reports a window below one symbol, fewer than two test phases or a symmetry below one.
func (b *BlindPhaseSearch) Err() error {
	switch {
	case b.Window < 1:
		return fmt.Errorf("carrier.BlindPhase: window %d must be at least 1 symbol", b.Window)
	case b.Tests < 2:
		return fmt.Errorf("carrier.BlindPhase: test phases %d must be at least 2", b.Tests)
	case b.Symmetry < 1:
		return fmt.Errorf("carrier.BlindPhase: symmetry %d must be at least 1", b.Symmetry)
	}
	return nil
}

// Process estimates, unwraps and removes the carrier phase.
func (b *BlindPhaseSearch) Process(f *link.Frame, r *rng.Stream) error {
	if err := check("carrier.BlindPhase", f); err != nil {
		return err
	}
	f.MakeComplex(r)
	b.s.set(f.Constellation)
	x := f.Samples
	n := len(x)
	b.d = link.GrowFloats(b.d, n)
	b.pre = link.GrowFloats(b.pre, n+1)
	b.best = link.GrowFloats(b.best, n)
	b.est = link.GrowFloats(b.est, n)
	period := 2 * math.Pi / float64(b.Symmetry)
	for i := range b.best {
		b.best[i] = math.Inf(1)
	}
	for t := range b.Tests {
		phi := (float64(t)/float64(b.Tests) - 0.5) * period
		s, c := math.Sincos(phi)
		rot := complex(c, s)
		for i, v := range x {
			b.d[i] = b.s.dist2(v * rot)
		}
		prefix(b.pre, b.d)
		for k := range x {
			lo, hi := window(k, b.Window, n)
			if w := b.pre[hi] - b.pre[lo]; w < b.best[k] {
				b.best[k], b.est[k] = w, -phi
			}
		}
	}
	unwrap(x, b.est, period)
	return nil
}

// slicer finds the squared distance to the nearest constellation point: per axis for a square
// grid of equally spaced levels (square QAM, QPSK), by search otherwise.
type slicer struct {
	pts   []complex128
	grid  bool
	lev   []float64 // grid levels, ascending
	step  float64
	first float64
}

func (s *slicer) set(pts []complex128) {
	if len(s.pts) == len(pts) && (len(pts) == 0 || &s.pts[0] == &pts[0]) {
		return
	}
	s.pts = pts
	s.grid = false
	re := make([]float64, 0, len(pts))
	im := make([]float64, 0, len(pts))
	for _, p := range pts {
		re = append(re, real(p))
		im = append(im, imag(p))
	}
	slices.Sort(re)
	slices.Sort(im)
	re = slices.CompactFunc(re, func(a, b float64) bool { return math.Abs(a-b) < 1e-9 })
	im = slices.CompactFunc(im, func(a, b float64) bool { return math.Abs(a-b) < 1e-9 })
	l := len(re)
	if l < 2 || len(im) != l || l*l != len(pts) {
		return
	}
	step := re[1] - re[0]
	for i := range re {
		if math.Abs(re[i]-(re[0]+float64(i)*step)) > 1e-9 || math.Abs(im[i]-re[i]) > 1e-9 {
			return
		}
	}
	s.grid, s.lev, s.step, s.first = true, re, step, re[0]
}

// axis is the squared distance from v to the nearest grid level.
func (s *slicer) axis(v float64) float64 {
	k := math.Round((v - s.first) / s.step)
	k = math.Max(0, math.Min(float64(len(s.lev)-1), k))
	d := v - (s.first + k*s.step)
	return d * d
}

func (s *slicer) dist2(v complex128) float64 {
	if s.grid {
		return s.axis(real(v)) + s.axis(imag(v))
	}
	best := math.Inf(1)
	for _, p := range s.pts {
		e := v - p
		if d := real(e)*real(e) + imag(e)*imag(e); d < best {
			best = d
		}
	}
	return best
}

// Nature declares the recovery adaptive to the estimators, which refuse it after the noise.
func (b *BlindPhaseSearch) Nature() link.Kind { return link.Adaptive }
