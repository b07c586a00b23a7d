package modem_test

import (
	"math"
	"testing"

	"tally/blocks/channel"
	"tally/blocks/impair"
	"tally/blocks/internal/linktest"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/rng"
	"tally/blocks/stats"
	"tally/blocks/theory"
)

// deFrame is the number of data bits per frame in these tests.
const deFrame = 4096

// deCount runs frames of blocks (after a fresh linktest.Source) until about 1000 errors are
// expected at BER want, counting only every stride-th bit: differential decoding makes errors
// come in pairs (one wrong symbol spoils both decisions that use it), so only decisions that
// share no symbol are counted, every other bit for DE-BPSK and the first bit of every other
// symbol for DE-QPSK (see checkAgainstTheory).
func deCount(t *testing.T, seed uint64, stride int, want float64, blocks ...link.Block) link.Tally {
	t.Helper()
	frames := int(math.Ceil(1000 / want * float64(stride) / deFrame))
	l := link.Chain(append([]link.Block{&linktest.Source{N: deFrame}}, blocks...)...)
	l.Count("strided", func(f *link.Frame) (n, e int64) {
		for i := 0; i < len(f.Bits); i += stride {
			n++
			if f.Bits[i] != f.Hard[i] {
				e++
			}
		}
		return n, e
	})
	c := linktest.Run(t, l, frames, seed)
	return c[len(c)-1]
}

// TestDifferentiallyEncodedAgainstTheory checks DE-BPSK and DE-QPSK against Pb = 2p(1 − p),
// p = Q(√(2Eb/N0)) (theory.DEBPSK, theory.DEQPSK), within the 99 % Clopper–Pearson interval,
// both without a phase offset and with one the constellation cannot tell from none (180° for
// BPSK, 90° for QPSK), which the differential decoding absorbs; plain coherent BPSK and QPSK
// fail under the same offset.
func TestDifferentiallyEncodedAgainstTheory(t *testing.T) {
	cases := []struct {
		name   string
		m      *modem.Modem
		plain  *modem.Modem
		stride int
		deg    float64
		ber    func(float64) float64
		lo, hi float64 // the plain scheme's BER under the offset
	}{
		{"DEBPSK", modem.DEBPSK(), modem.BPSK(), 2, 180, theory.DEBPSK, 0.95, 1},
		{"DEQPSK", modem.DEQPSK(), modem.QPSK(), 4, 90, theory.DEQPSK, 0.45, 0.55},
	}
	seed := uint64(500)
	for _, c := range cases {
		for _, target := range []float64{3e-2, 2e-3} {
			db := theory.EbN0For(target, c.ber)
			want := c.ber(db)
			for _, deg := range []float64{0, c.deg} {
				seed++
				n := deCount(t, seed, c.stride, want, c.m.Mod(), impair.Phase(deg), channel.AWGN(db), c.m.Demod())
				e, err := stats.ClopperPearson(n.Errors, n.Trials, 0.99)
				if err != nil {
					t.Fatal(err)
				}
				if want < e.Low || want > e.High {
					t.Errorf("%s, phase %v°, at %.2f dB: %d errors in %d bits, 99%% interval [%.3g, %.3g], theory %.3g",
						c.name, deg, db, n.Errors, n.Trials, e.Low, e.High, want)
				}
			}
			e, n := linktest.BER(t, seed, 4, &linktest.Source{N: deFrame}, c.plain.Mod(), impair.Phase(c.deg), channel.AWGN(db), c.plain.Demod())
			if r := float64(e) / float64(n); r < c.lo || r > c.hi {
				t.Errorf("plain %s, phase %v°, at %.2f dB: BER %.3g, expected %v … %v", c.plain.Name(), c.deg, db, r, c.lo, c.hi)
			}
		}
	}
}

// slip turns every sample from index At on by Deg degrees: a cycle slip in mid-frame.
type slip struct {
	At  int
	Deg float64
}

func (s slip) Process(f *link.Frame, r *rng.Stream) error {
	f.MakeComplex(r)
	sn, cs := math.Sincos(s.Deg * math.Pi / 180)
	for i := s.At; i < len(f.Samples); i++ {
		f.Samples[i] *= complex(cs, sn)
	}
	return nil
}

// Without noise, a constant ambiguity costs nothing and a slip costs at most the one symbol
// that straddles it, for hard and soft outputs alike.
func TestDifferentiallyEncodedSlip(t *testing.T) {
	for _, c := range []struct {
		m   *modem.Modem
		deg float64
	}{{modem.DEBPSK(), 180}, {modem.DEQPSK(), 90}, {modem.DEQPSK(), 180}, {modem.DEQPSK(), -90}} {
		for _, d := range []*modem.Detector{c.m.Demod(), c.m.Demod().MaxLog(), c.m.Demod().LogMAP()} {
			src := &linktest.Source{N: deFrame}
			// A tiny noise gives the soft detectors their N0 without any errors.
			e, _ := linktest.BER(t, 3, 2, src, c.m.Mod(), impair.Phase(c.deg), channel.AWGN(60), d)
			if e != 0 {
				t.Errorf("%s %v, phase %v°: %d errors", c.m.Name(), d.Soft, c.deg, e)
			}
			e, _ = linktest.BER(t, 3, 2, src, c.m.Mod(), slip{At: 1000, Deg: c.deg}, channel.AWGN(60), d)
			if e == 0 || e > int64(2*c.m.Bits) {
				t.Errorf("%s %v, slip of %v°: %d errors in two frames, want 1 … %d", c.m.Name(), d.Soft, c.deg, e, 2*c.m.Bits)
			}
		}
	}
}

// Max-log soft outputs give the same decisions as the hard detector (the pair metric is largest
// for the two nearest quadrants), and log-MAP agrees with it in sign nearly everywhere.
func TestDifferentiallyEncodedSoft(t *testing.T) {
	for _, m := range []*modem.Modem{modem.DEBPSK(), modem.DEQPSK()} {
		db := theory.EbN0For(5e-2, theory.DEBPSK)
		var f link.Frame
		grab := probe(func(g *link.Frame) { f = *g; f.Samples = append([]complex128(nil), g.Samples...) })
		linktest.BER(t, 9, 1, &linktest.Source{N: deFrame}, m.Mod(), channel.AWGN(db), grab, m.Demod())
		y := f.Samples
		decide := func(d *modem.Detector) ([]byte, []float64) {
			g := f
			g.Samples = append([]complex128(nil), y...)
			if err := d.Process(&g, rng.New(1)); err != nil {
				t.Fatal(err)
			}
			return append([]byte(nil), g.Hard...), append([]float64(nil), g.LLR...)
		}
		hard, _ := decide(m.Demod())
		if len(hard) != deFrame {
			t.Fatalf("%s: %d decisions for %d bits", m.Name(), len(hard), deFrame)
		}
		ml, llr := decide(m.Demod().MaxLog())
		lm, exact := decide(m.Demod().LogMAP())
		diff := 0
		for i := range hard {
			if ml[i] != hard[i] {
				t.Fatalf("%s: max-log decision %d differs from the hard one", m.Name(), i)
			}
			if lm[i] != hard[i] {
				diff++
			}
			if math.IsNaN(exact[i]) || math.IsInf(exact[i], 0) || math.Abs(exact[i]) > math.Abs(llr[i])+1e-9+math.Ln2*2 {
				t.Fatalf("%s: log-MAP LLR %v against max-log %v at %d", m.Name(), exact[i], llr[i], i)
			}
		}
		if diff > deFrame/100 {
			t.Errorf("%s: log-MAP and hard decisions differ in %d of %d bits", m.Name(), diff, deFrame)
		}
	}
}

// probe is a block that hands the frame to a function.
type probe func(*link.Frame)

func (p probe) Process(f *link.Frame, r *rng.Stream) error { p(f); return nil }
