package fec_test

import (
	"testing"

	"tally/blocks/internal/linktest"
	"tally/blocks/link"
	"tally/blocks/rng"
)

// Minimal stand-ins for the modem blocks (the source is linktest.Source), so these tests depend
// on nothing but the link contract.

// bpsk maps bit b to 1 − 2b on the real axis; its demodulator gives Hard and, with soft, the
// exact LLR 4y/N0 (for unit energy symbols and noise N0/2 per dimension).
type bpsk struct {
	samples []complex128
}

func (m *bpsk) Process(f *link.Frame, _ *rng.Stream) error {
	m.samples = link.GrowComplex(m.samples, len(f.Coded))
	for i, b := range f.Coded {
		m.samples[i] = complex(float64(1-2*int(b)), 0)
	}
	f.Samples, f.SPS, f.Symbols, f.BitsPerSymbol, f.Es, f.Real = m.samples, 1, len(f.Coded), 1, 1, true
	return nil
}

type bpskDemod struct {
	soft bool
	hard []byte
	llr  []float64
}

func (d *bpskDemod) Process(f *link.Frame, _ *rng.Stream) error {
	d.hard = link.GrowBytes(d.hard, len(f.Samples))
	for i, y := range f.Samples {
		d.hard[i] = 0
		if real(y) < 0 {
			d.hard[i] = 1
		}
	}
	f.Hard = d.hard
	if d.soft {
		d.llr = link.GrowFloats(d.llr, len(f.Samples))
		for i, y := range f.Samples {
			d.llr[i] = 4 * real(y) / f.N0
		}
		f.LLR = d.llr
	}
	return nil
}

// bsc is a binary symmetric channel straight from f.Coded to f.Hard, flip probability p.
type bsc struct {
	p    float64
	hard []byte
}

func (c *bsc) Process(f *link.Frame, r *rng.Stream) error {
	c.hard = link.GrowBytes(c.hard, len(f.Coded))
	for i, b := range f.Coded {
		if r.Float64() < c.p {
			b ^= 1
		}
		c.hard[i] = b
	}
	f.Hard = c.hard
	return nil
}

// flips is a noiseless wire from f.Coded to f.Hard that flips the listed positions.
type flips struct {
	at   []int
	hard []byte
}

func (c *flips) Process(f *link.Frame, _ *rng.Stream) error {
	c.hard = append(c.hard[:0], f.Coded...)
	for _, i := range c.at {
		c.hard[i] ^= 1
	}
	f.Hard = c.hard
	return nil
}

// run passes frames through l and returns the counts by tap name.
func run(t testing.TB, l *link.Link, frames int, seed uint64) map[string]link.Tally {
	t.Helper()
	counts := linktest.Run(t, l, frames, seed)
	m := map[string]link.Tally{}
	for i, name := range l.Taps() {
		m[name] = counts[i]
	}
	return m
}
