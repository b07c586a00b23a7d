package impair

// Test-only Gray mappers and a BER runner, so these tests need no other block package.

import (
	"math"
	"testing"

	"tally/blocks/link"
	"tally/blocks/rng"
	"tally/blocks/stats"
)

// testSource fills f.Bits with n random bits.
type testSource struct {
	n   int
	buf []byte
}

func (s *testSource) Process(f *link.Frame, r *rng.Stream) error {
	s.buf = link.GrowBytes(s.buf, s.n)
	r.Bits(s.buf)
	f.Bits, f.Coded = s.buf, s.buf
	return nil
}

// grayPAM is the Gray-labelled L-level PAM alphabet, unit spacing 2, label read MSB first.
func grayPAM(bits int) []float64 {
	l := 1 << bits
	a := make([]float64, l)
	for i := range l {
		g := i ^ (i >> 1) // level i carries Gray label g
		a[g] = float64(2*i - l + 1)
	}
	return a
}

// testModem is square QAM (or BPSK when bitsI = 1, bitsQ = 0) with Gray labels per axis,
// unit average symbol energy.
type testModem struct {
	bi, bq int
	pts    []complex128
	out    []complex128
	hard   []byte
}

func newTestModem(bi, bq int) *testModem {
	m := &testModem{bi: bi, bq: bq}
	ai, aq := grayPAM(bi), []float64{0}
	if bq > 0 {
		aq = grayPAM(bq)
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

func (m *testModem) k() int { return m.bi + m.bq }

// Process maps bits to symbols (label = I bits then Q bits, MSB first).
func (m *testModem) Process(f *link.Frame, r *rng.Stream) error {
	k := m.k()
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

// demod is the minimum-distance hard detector of a testModem.
type demod struct{ m *testModem }

func (d demod) Process(f *link.Frame, r *rng.Stream) error {
	m := d.m
	k := m.k()
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

// ber runs frames of nbits through blocks and returns errors and bits.
func ber(t *testing.T, seed uint64, frames int, blocks ...link.Block) (errs, bits int64) {
	t.Helper()
	l := link.Chain(blocks...)
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
	return counts[0].Errors, counts[0].Trials
}

// within checks that theory p lies in the 99 % Clopper–Pearson interval of errs/bits.
func within(t *testing.T, what string, errs, bits int64, p float64) {
	t.Helper()
	e, err := stats.ClopperPearson(errs, bits, 0.99)
	if err != nil {
		t.Fatal(err)
	}
	if p < e.Low || p > e.High {
		t.Errorf("%s: BER %.4g (%d/%d), 99%% interval [%.4g, %.4g], theory %.4g", what, e.Rate, errs, bits, e.Low, e.High, p)
	}
}

// qfunc is the Gaussian tail Q(x) = erfc(x/√2)/2.
func qfunc(x float64) float64 { return 0.5 * math.Erfc(x/math.Sqrt2) }

// Theory, Gray labels: BPSK/QPSK Pb = Q(√(2Eb/N0)) (Proakis and Salehi, Digital
// Communications, 5th ed., 2008, ch. 4); 16-QAM from Cho and Yoon, "On the general BER
// expression of one- and two-dimensional amplitude modulations", IEEE Trans. Commun., 2002,
// at M = 16.
func berQPSK(ebn0dB float64) float64 { return qfunc(math.Sqrt(2 * math.Pow(10, ebn0dB/10))) }

func ber16QAM(ebn0dB float64) float64 {
	x := math.Sqrt(0.8 * math.Pow(10, ebn0dB/10))
	return (3*qfunc(x) + 2*qfunc(3*x) - qfunc(5*x)) / 4
}
