package channel

import (
	"fmt"
	"math"
	"math/cmplx"

	"tally/blocks/link"
	"tally/blocks/rng"
)

// FIR is a static multipath channel: an FIR filter that adds intersymbol interference,
//
//	y[n] = Σₗ h[l]·x[n − (l − m)],   l = 0 … len(h)−1,
//
// with taps spaced one sample apart (one symbol at one sample per symbol) and the receiver
// timed to the strongest path m = MainPath(h) (the first of equal ones): that path arrives
// on time, earlier taps are precursors, later ones echoes. The frame keeps its length, so
// every symbol keeps its main path; the filter starts empty in every frame (no signal before
// the first symbol or after the last), and echoes that would fall after the last sample are
// cut.
//
// Energy: by default the taps are scaled to unit energy, Σ|h|² = 1, so the average received
// symbol energy equals the transmitted one and the Eb/N0 of the AWGN block after it is the
// received Eb/N0. AsGiven applies the taps unscaled. Taps reports the taps applied, for an
// equaliser designed from known taps.
type FIR struct {
	Paths  []complex128 // the taps as given
	Scaled bool         // scale to unit energy (the default)
	Block  string       // name in messages

	h   []complex128
	m   int
	out []complex128
	err error
}

// MainPath is the index of the strongest tap (the first of equal ones): the path a receiver
// is timed to, by channel.Multipath and the equalize package alike.
func MainPath(taps []complex128) int {
	m, best := 0, -1.0
	for i, t := range taps {
		if p := real(t)*real(t) + imag(t)*imag(t); p > best {
			m, best = i, p
		}
	}
	return m
}

// Multipath is a static multipath (ISI) channel with the given complex taps; see FIR.
func Multipath(taps []complex128) *FIR {
	c := &FIR{Paths: append([]complex128(nil), taps...), Scaled: true, Block: "channel.Multipath"}
	var e float64
	for i, t := range taps {
		if cmplx.IsNaN(t) || cmplx.IsInf(t) {
			c.err = fmt.Errorf("%s: tap %d = %v is not a finite number", c.Block, i, t)
			return c
		}
		e += real(t)*real(t) + imag(t)*imag(t)
	}
	if e == 0 {
		c.err = fmt.Errorf("%s: taps %v have no energy", c.Block, taps)
	}
	c.setTaps()
	return c
}

// AsGiven applies the taps unscaled.
func (c *FIR) AsGiven() *FIR { c.Scaled = false; c.setTaps(); return c }

func (c *FIR) setTaps() {
	c.h = append(c.h[:0], c.Paths...)
	c.m = MainPath(c.h)
	if !c.Scaled {
		return
	}
	var e float64
	for _, t := range c.h {
		e += real(t)*real(t) + imag(t)*imag(t)
	}
	if e == 0 {
		return
	}
	s := complex(1/math.Sqrt(e), 0)
	for i := range c.h {
		c.h[i] *= s
	}
}

// Taps are the taps the channel applies (scaled to unit energy unless AsGiven).
func (c *FIR) Taps() []complex128 { return append([]complex128(nil), c.h...) }

// Name is the constructor's name.
func (c *FIR) Name() string { return c.Block }

// Err reports a bad tap.
func (c *FIR) Err() error { return c.err }

// Process filters the frame.
func (c *FIR) Process(f *link.Frame, r *rng.Stream) error {
	mix := f.PendingImagSigma > 0 // pending noise must be filtered too
	for _, t := range c.h {
		if imag(t) != 0 {
			mix = true // complex taps mix I and Q
		}
	}
	if mix {
		f.MakeComplex(r)
	}
	x, h := f.Samples, c.h
	c.out = link.GrowComplex(c.out, len(x))
	for n := range c.out {
		var s complex128
		for l, t := range h {
			if i := n + c.m - l; i >= 0 && i < len(x) {
				s += t * x[i]
			}
		}
		c.out[n] = s
	}
	f.Samples = c.out
	return nil
}
