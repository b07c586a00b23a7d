// Package linktest is test support for the block packages: a random bit source, Gray-labelled
// PAM/QAM mappers with a minimum-distance detector, a BPSK source-mapper with its sign
// detector, link runners that count errors, a Clopper–Pearson check against theory, and the
// AWGN closed forms those tests compare with. It depends only on the link contract (link, rng,
// stats), so a block's tests need no other block package. Only _test.go files should import
// it.
package linktest

import (
	"math"
	"testing"

	"tally/blocks/link"
	"tally/blocks/rng"
	"tally/blocks/stats"
)

// Source fills f.Bits (and f.Coded, uncoded) with N random bits per frame.
type Source struct {
	N   int
	buf []byte
}

// Process draws the frame's bits from r.
func (s *Source) Process(f *link.Frame, r *rng.Stream) error {
	s.buf = link.GrowBytes(s.buf, s.N)
	r.Bits(s.buf)
	f.Bits, f.Coded = s.buf, s.buf
	return nil
}

// GrayPAM is the Gray-labelled L-level PAM alphabet, unit spacing 2, label read MSB first.
func GrayPAM(bits int) []float64 {
	l := 1 << bits
	a := make([]float64, l)
	for i := range l {
		g := i ^ (i >> 1) // level i carries Gray label g
		a[g] = float64(2*i - l + 1)
	}
	return a
}

// Modem is square QAM (or BPSK when bitsI = 1, bitsQ = 0) with Gray labels per axis,
// unit average symbol energy.
type Modem struct {
	bi, bq int
	pts    []complex128
	out    []complex128
	hard   []byte
}

// NewModem is the modem with bitsI bits on the I axis and bitsQ on the Q axis.
func NewModem(bitsI, bitsQ int) *Modem {
	m := &Modem{bi: bitsI, bq: bitsQ}
	ai, aq := GrayPAM(bitsI), []float64{0}
	if bitsQ > 0 {
		aq = GrayPAM(bitsQ)
	}
	var e float64
	for li := range ai {
		for lq := range aq {
			p := complex(ai[li], aq[lq])
			m.pts = append(m.pts, p)
			e += real(p)*real(p) + imag(p)*imag(p)
		}
	}
	s := complex(1/math.Sqrt(e/float64(len(m.pts))), 0)
	for i := range m.pts {
		m.pts[i] *= s
	}
	return m
}

// K is the number of bits per symbol.
func (m *Modem) K() int { return m.bi + m.bq }

// Symbols is the last frame's mapped symbols (the modem's own buffer).
func (m *Modem) Symbols() []complex128 { return m.out }

// Process maps bits to symbols (label = I bits then Q bits, MSB first).
func (m *Modem) Process(f *link.Frame, r *rng.Stream) error {
	k := m.K()
	n := len(f.Coded) / k
	m.out = link.GrowComplex(m.out, n)
	for s := range n {
		lab := 0
		for _, b := range f.Coded[s*k : s*k+k] {
			lab = lab<<1 | int(b)
		}
		m.out[s] = m.pts[lab]
	}
	f.Samples, f.SPS, f.Symbols, f.BitsPerSymbol, f.Es = m.out, 1, n, k, 1
	f.Constellation, f.Real = m.pts, m.bq == 0
	return nil
}

// Demod is the minimum-distance hard detector of a Modem.
func (m *Modem) Demod() Demod { return Demod{m} }

// Demod is the minimum-distance hard detector of a Modem; make one with Modem.Demod.
type Demod struct{ m *Modem }

// Process decides every sample on the nearest point and writes its label bits to f.Hard.
func (d Demod) Process(f *link.Frame, r *rng.Stream) error {
	m := d.m
	k := m.K()
	m.hard = link.GrowBytes(m.hard, len(f.Samples)*k)
	for s, y := range f.Samples {
		best, bd := 0, math.Inf(1)
		for lab, p := range m.pts {
			e := y - p
			if dd := real(e)*real(e) + imag(e)*imag(e); dd < bd {
				best, bd = lab, dd
			}
		}
		for j := range k {
			m.hard[s*k+j] = byte(best>>(k-1-j)) & 1
		}
	}
	f.Hard = m.hard
	return nil
}

// BPSK is a source and BPSK mapper in one (bit 0 → +1, bit 1 → −1) at one sample per
// symbol: N random bits per frame, f.Constellation {+1, −1}.
type BPSK struct {
	N    int
	bits []byte
	x    []complex128
}

var bpskPoints = []complex128{1, -1}

// Process draws the frame's bits from r and maps them.
func (b *BPSK) Process(f *link.Frame, r *rng.Stream) error {
	b.bits = link.GrowBytes(b.bits, b.N)
	r.Bits(b.bits)
	b.x = link.GrowComplex(b.x, b.N)
	for i, v := range b.bits {
		b.x[i] = complex(1-2*float64(v), 0)
	}
	f.Bits, f.Coded, f.Samples = b.bits, b.bits, b.x
	f.SPS, f.Symbols, f.BitsPerSymbol, f.Es, f.Real = 1, b.N, 1, 1, true
	f.Constellation = bpskPoints
	return nil
}

// BPSKDetector decides BPSK on the sign of the real part, one sample per symbol.
type BPSKDetector struct{ hard []byte }

// Process writes f.Hard; a frame not at one sample per symbol is left without decisions.
func (b *BPSKDetector) Process(f *link.Frame, r *rng.Stream) error {
	if f.SPS != 1 || len(f.Samples) != f.Symbols {
		return nil // leaves Hard short: the link reports it
	}
	b.hard = link.GrowBytes(b.hard, f.Symbols)
	for i := range b.hard {
		b.hard[i] = 0
		if real(f.Samples[i]) < 0 {
			b.hard[i] = 1
		}
	}
	f.Hard = b.hard
	return nil
}

// Run checks l, passes frames through it with the given seed and returns the counts of its
// taps, in the order of l.Taps().
func Run(t testing.TB, l *link.Link, frames int, seed uint64) []link.Tally {
	t.Helper()
	if err := l.Check(); err != nil {
		t.Fatal(err)
	}
	counts := make([]link.Tally, len(l.Taps()))
	var f link.Frame
	for i := range frames {
		if err := l.Run(&f, seed, 0, i, counts); err != nil {
			t.Fatal(err)
		}
	}
	return counts
}

// BER runs frames through the chain of blocks and returns the errors and bits of its first tap.
func BER(t testing.TB, seed uint64, frames int, blocks ...link.Block) (errs, bits int64) {
	t.Helper()
	c := Run(t, link.Chain(blocks...), frames, seed)[0]
	return c.Errors, c.Trials
}

// Estimate runs frames through l and returns the rate of its first tap with the 99 %
// Clopper–Pearson interval.
func Estimate(t testing.TB, l *link.Link, frames int, seed uint64) stats.Estimate {
	t.Helper()
	c := Run(t, l, frames, seed)[0]
	e, err := stats.ClopperPearson(c.Errors, c.Trials, 0.99)
	if err != nil {
		t.Fatal(err)
	}
	return e
}

// Within checks that theory p lies in the 99 % Clopper–Pearson interval of errs/bits.
func Within(t testing.TB, what string, errs, bits int64, p float64) {
	t.Helper()
	e, err := stats.ClopperPearson(errs, bits, 0.99)
	if err != nil {
		t.Fatal(err)
	}
	if p < e.Low || p > e.High {
		t.Errorf("%s: BER %.4g (%d/%d), 99%% interval [%.4g, %.4g], theory %.4g", what, e.Rate, errs, bits, e.Low, e.High, p)
	}
}

// Q is the Gaussian tail Q(x) = erfc(x/√2)/2.
func Q(x float64) float64 { return 0.5 * math.Erfc(x/math.Sqrt2) }

// DB is x dB as a linear power ratio, 10^(x/10).
func DB(x float64) float64 { return math.Pow(10, x/10) }

// BERQPSK is the bit error rate of Gray BPSK or QPSK in AWGN at Eb/N0 = ebn0dB dB,
// Pb = Q(√(2Eb/N0)) (Proakis and Salehi, Digital Communications, 5th ed., 2008, ch. 4).
func BERQPSK(ebn0dB float64) float64 { return Q(math.Sqrt(2 * math.Pow(10, ebn0dB/10))) }

// BER16QAM is the bit error rate of Gray 16-QAM in AWGN at Eb/N0 = ebn0dB dB, from Cho and
// Yoon, "On the general BER expression of one- and two-dimensional amplitude modulations",
// IEEE Trans. Commun., 2002, at M = 16.
func BER16QAM(ebn0dB float64) float64 {
	x := math.Sqrt(0.8 * math.Pow(10, ebn0dB/10))
	return (3*Q(x) + 2*Q(3*x) - Q(5*x)) / 4
}
