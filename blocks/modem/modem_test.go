package modem_test

import (
	"math"
	"math/bits"
	"strconv"
	"strings"
	"testing"

	"tally/blocks/channel"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/rng"
	"tally/blocks/source"
)

// coherent lists the schemes with a single complex point per label.
func coherent() map[string]*modem.Modem {
	s := map[string]*modem.Modem{
		"BPSK": modem.BPSK(), "QPSK": modem.QPSK(), "OOK": modem.OOK(),
	}
	for _, M := range []int{8, 16, 32, 64} {
		s["PSK"+strconv.Itoa(M)] = modem.PSK(M)
	}
	for _, M := range []int{4, 16, 64, 256, 1024} {
		s["QAM"+strconv.Itoa(M)] = modem.QAM(M)
	}
	for _, M := range []int{2, 4, 8, 16, 32, 64} {
		s["PAM"+strconv.Itoa(M)] = modem.PAM(M)
	}
	return s
}

func TestUnitAverageEnergy(t *testing.T) {
	// Es = 1 with equiprobable symbols (the energy convention of blocks/link).
	for name, m := range coherent() {
		p := m.Points()
		if len(p) != m.M {
			t.Fatalf("%s: %d points for M = %d", name, len(p), m.M)
		}
		e := 0.0
		for _, s := range p {
			e += real(s)*real(s) + imag(s)*imag(s)
		}
		if e /= float64(len(p)); math.Abs(e-1) > 1e-12 {
			t.Errorf("%s: average energy %v", name, e)
		}
	}
}

func TestGrayNeighboursDifferInOneBit(t *testing.T) {
	// In a Gray labelling every pair of nearest neighbours differs in exactly one bit (the
	// property that makes Pb ≈ Ps/log2 M at high SNR; common practice, no source). Checked
	// directly on the points: for each point, every point at the minimum distance.
	for name, m := range coherent() {
		if m.Scheme == "OOK" {
			continue
		}
		p := m.Points()
		dmin := math.Inf(1)
		for i := range p {
			for j := range i {
				dmin = math.Min(dmin, cabs(p[i]-p[j]))
			}
		}
		for i := range p {
			for j := range i {
				if cabs(p[i]-p[j]) < dmin*(1+1e-9) && bits.OnesCount(uint(i^j)) != 1 {
					t.Errorf("%s: neighbours %b and %b differ in more than one bit", name, i, j)
				}
			}
		}
	}
}

func cabs(c complex128) float64 { return math.Hypot(real(c), imag(c)) }

func TestQPSKIsQAM4AndBPSKIsPAM2(t *testing.T) {
	same := func(a, b []complex128) bool {
		for i := range a {
			if cabs(a[i]-b[i]) > 1e-15 {
				return false
			}
		}
		return len(a) == len(b)
	}
	if !same(modem.QPSK().Points(), modem.QAM(4).Points()) || !same(modem.QPSK().Points(), modem.PSK(4).Points()) {
		t.Error("QPSK, QAM(4) and PSK(4) differ")
	}
	if !same(modem.BPSK().Points(), modem.PAM(2).Points()) || !same(modem.BPSK().Points(), []complex128{1, -1}) {
		t.Error("BPSK is not 0 → +1, 1 → −1 or differs from PAM(2)")
	}
}

func TestBadParameters(t *testing.T) {
	cases := []struct {
		m    *modem.Modem
		want string
	}{
		{modem.QAM(12), "modem.QAM: M = 12 is not a square power of two"},
		{modem.QAM(32), "modem.QAM: M = 32 is not a square power of two"},
		{modem.QAM(4096), "modem.QAM: M = 4096 is outside 4 … 1024"},
		{modem.PSK(12), "modem.PSK: M = 12 is not a power of two"},
		{modem.PSK(128), "modem.PSK: M = 128 is outside 2 … 64"},
		{modem.PSK(1), "modem.PSK: M = 1 is not a power of two"},
		{modem.PAM(0), "modem.PAM: M = 0 is not a power of two"},
		{modem.PAM(-4), "modem.PAM: M = -4 is not a power of two"},
	}
	for _, c := range cases {
		for _, b := range []link.Checked{c.m, c.m.Mod(), c.m.Demod()} {
			err := b.Err()
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %v, want one containing %q", err, c.want)
			}
		}
	}
	err := modem.DBPSK().Demod().CSI().Err()
	if err == nil || !strings.Contains(err.Error(), "modem.DBPSK.Demod: CSI is for coherent detectors") {
		t.Errorf("DBPSK with CSI: error %v", err)
	}
	// link.Chain stops a script at a bad block (it panics with the block's message).
	func() {
		defer func() {
			if r := recover(); r == nil || !strings.Contains(r.(error).Error(), "modem.PSK: M = 12") {
				t.Errorf("link.Chain with PSK(12): recovered %v", r)
			}
		}()
		link.Chain(source.Random(120), modem.PSK(12).Mod())
	}()
	if err := channel.AWGN(math.NaN()).Err(); err == nil || !strings.Contains(err.Error(), "channel.AWGN: level NaN dB") {
		t.Errorf("AWGN(NaN): error %v", err)
	}
}

func TestFrameErrors(t *testing.T) {
	run := func(blocks ...link.Block) error {
		l := link.Chain(blocks...)
		var f link.Frame
		return l.Run(&f, 1, 0, 0, make([]link.Tally, len(l.Taps())))
	}
	m := modem.QAM(16)
	if err := run(source.Random(1001), m.Mod(), m.Demod()); err == nil ||
		!strings.Contains(err.Error(), "modem.QAM(16).Mod: 1001 coded bits do not fill whole 4-bit symbols") {
		t.Errorf("odd frame: %v", err)
	}
	if err := run(source.Random(1000), m.Mod(), m.Demod().LogMAP()); err == nil ||
		!strings.Contains(err.Error(), "modem.QAM(16).Demod: soft output needs the noise density N0") {
		t.Errorf("soft without a channel: %v", err)
	}
	if err := run(source.Random(1000), m.Mod(), channel.AWGN(10), m.Demod().CSI()); err == nil ||
		!strings.Contains(err.Error(), "CSI needs one channel gain per sample") {
		t.Errorf("CSI without gains: %v", err)
	}
	// Noiseless: every scheme gives back its bits.
	all := coherent()
	all["DBPSK"], all["DQPSK"], all["BFSK"], all["BFSK-NC"] = modem.DBPSK(), modem.DQPSK(), modem.BFSK(), modem.BFSKNoncoherent()
	for name, m := range all {
		l := link.Chain(source.Random(1200), m.Mod(), m.Demod())
		var f link.Frame
		c := make([]link.Tally, len(l.Taps()))
		if err := l.Run(&f, 1, 0, 0, c); err != nil || c[0].Errors != 0 {
			t.Errorf("%s noiseless: %v, %d errors", name, err, c[0].Errors)
		}
	}
}

func TestNoAllocationPerFrame(t *testing.T) {
	for _, m := range []*modem.Modem{modem.BPSK(), modem.QAM(64), modem.PSK(16), modem.DQPSK(), modem.BFSKNoncoherent()} {
		for _, d := range []*modem.Detector{m.Demod(), m.Demod().LogMAP(), m.Demod().MaxLog()} {
			l := link.Chain(source.Random(1200), m.Mod(), channel.AWGN(5), d)
			var f link.Frame
			c := make([]link.Tally, len(l.Taps()))
			_ = l.Run(&f, 1, 0, 0, c)
			i := 0
			if n := testing.AllocsPerRun(10, func() { i++; _ = l.Run(&f, 1, 0, i, c) }); n != 0 {
				t.Errorf("%s: %v allocations per frame", d.Name(), n)
			}
		}
	}
}

// received makes one frame of n random bits through m's modulator and AWGN at db (Eb/N0).
func received(t *testing.T, m *modem.Modem, n int, db float64, key uint64) *link.Frame {
	t.Helper()
	f := &link.Frame{SPS: 1, CodeRate: 1, Es: 1}
	for i, b := range []link.Block{source.Random(n), m.Mod(), channel.AWGN(db)} {
		if err := b.Process(f, rng.New(key+uint64(i))); err != nil {
			t.Fatal(err)
		}
	}
	return f
}

// detect runs detector d on a copy of frame f's samples.
func detect(t *testing.T, d *modem.Detector, f *link.Frame) *link.Frame {
	t.Helper()
	g := *f
	g.Samples = append([]complex128(nil), f.Samples...)
	if err := d.Process(&g, rng.New(99)); err != nil {
		t.Fatal(err)
	}
	return &g
}

func sourceRandom(n int) link.Block { return source.Random(n) }
func awgn(db float64) link.Block    { return channel.AWGN(db) }
