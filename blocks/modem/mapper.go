package modem

import (
	"fmt"

	"tally/blocks/link"
	"tally/blocks/rng"
)

// Mapper is a modem's modulator block: it maps f.Coded to one complex sample per symbol
// (two for BFSK) with unit average symbol energy, and sets SPS, Symbols, BitsPerSymbol, Es = 1,
// Constellation and Real. The number of coded bits must be a multiple of the bits per symbol.
type Mapper struct {
	m   *Modem
	buf []complex128
}

// Mod is the modem's modulator.
func (m *Modem) Mod() *Mapper { return &Mapper{m: m} }

// Name is the modem's name with ".Mod", for example "modem.QAM(16).Mod".
func (b *Mapper) Name() string { return b.m.name + ".Mod" }

// Err reports the modem's parameter error.
func (b *Mapper) Err() error { return b.m.err }

// Process maps the frame's coded bits.
func (b *Mapper) Process(f *link.Frame, r *rng.Stream) error {
	m := b.m
	if m.err != nil {
		return m.err
	}
	c := f.Coded
	k := m.Bits
	if len(c)%k != 0 {
		return fmt.Errorf("%d coded bits do not fill whole %d-bit symbols", len(c), k)
	}
	ns := len(c) / k
	sps := 1
	switch m.kind {
	case kindAxis:
		b.buf = link.GrowComplex(b.buf, ns)
		b.mapAxis(c)
	case kindPSK, kindOOK:
		b.buf = link.GrowComplex(b.buf, ns)
		for i := range b.buf {
			b.buf[i] = m.points[label(c[i*k:i*k+k])]
		}
	case kindDBPSK:
		b.buf = link.GrowComplex(b.buf, ns+1)
		s := 1.0
		b.buf[0] = 1
		for i, x := range c {
			s *= 1 - 2*float64(x&1)
			b.buf[i+1] = complex(s, 0)
		}
		ns++
	case kindDQPSK:
		b.buf = link.GrowComplex(b.buf, ns+1)
		b.buf[0] = 1
		p := 0 // phase index: the symbol is j^p
		for i := range ns {
			p = (p + grayInv[c[2*i]&1<<1|c[2*i+1]&1]) & 3
			b.buf[i+1] = quarter[p]
		}
		ns++
	case kindDEBPSK, kindDEQPSK:
		b.buf = link.GrowComplex(b.buf, ns+1)
		mapDE(m, c, b.buf, ns)
		ns++
	case kindFSK, kindNCFSK:
		b.buf = link.GrowComplex(b.buf, 2*ns)
		for i, x := range c {
			on := float64(x & 1)
			b.buf[2*i] = complex(1-on, 0)
			b.buf[2*i+1] = complex(on, 0)
		}
		sps = 2
	}
	f.Samples = b.buf
	f.SPS = sps
	f.Symbols = ns
	f.BitsPerSymbol = k
	f.Es = 1
	f.Constellation = m.points
	f.Real = m.Real()
	f.PendingImagSigma = 0
	return nil
}

// bpskPoints[b] is the BPSK point of bit b: 1 − 2b.
var bpskPoints = [2]complex128{1, -1}

// grayInv[l] is the position q with gray(q) = l, for two bits.
var grayInv = [4]int{0, 1, 3, 2}

// mapAxis maps bits to PAM (one axis) or square QAM (two axes) points, level by slicing
// the bits, with BPSK and QPSK branch-free.
func (b *Mapper) mapAxis(c []byte) {
	m := b.m
	a := &m.axis
	switch {
	case m.axes == 1 && a.L == 2:
		buf := b.buf[:len(c)]
		for i, x := range c {
			buf[i] = bpskPoints[x&1]
		}
	case m.axes == 2 && a.L == 2:
		d := a.d
		for i := range b.buf {
			b.buf[i] = complex(d*(1-2*float64(c[2*i]&1)), d*(1-2*float64(c[2*i+1]&1)))
		}
	case m.axes == 2 && a.L == 4: // 16-QAM: the label of four bits, most significant first
		p := m.points[:16]
		for i := range b.buf {
			q := c[4*i : 4*i+4 : 4*i+4]
			b.buf[i] = p[(q[0]&1)<<3|(q[1]&1)<<2|(q[2]&1)<<1|q[3]&1]
		}
	default:
		k := m.Bits
		for i := range b.buf {
			b.buf[i] = m.points[label(c[i*k:i*k+k])]
		}
	}
}
