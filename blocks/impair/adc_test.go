package impair

import (
	"math"
	"testing"

	"tally/blocks/channel"
	"tally/blocks/internal/linktest"
)

// A full-scale sine through a b-bit uniform quantiser has SQNR = 6.02·b + 1.76 dB, exactly
// 10·log10(1.5·4^b) (Bennett, "Spectra of quantized signals", Bell Syst. Tech. J., 1948, for
// the Δ²/12 error power; Kester, "Taking the mystery out of the infamous formula
// SNR = 6.02N + 1.76 dB", Analog Devices MT-001, 2009, for the sine). The formula takes the
// error as uniform; at the crests of a full-scale sine, where the signal dwells in the top
// step, it is not, and the true SQNR falls short by an amount that halves every two bits
// (about 0.5 dB at 4 bits, 0.27 dB at 6): hence 6 bits and up, within 0.3 dB.
func TestQuantiserSQNR(t *testing.T) {
	const n = 1 << 16
	w := 2 * math.Pi / (math.Pi * math.E) // incommensurate with the sample rate: error close to uniform
	for _, b := range []int{6, 8, 10, 12, 14} {
		q := Quantiser{Bits: b, FullScale: 1.5}
		var ps, pe float64
		for i := range n {
			x := q.FullScale * math.Sin(w*float64(i))
			e := q.Level(x) - x
			ps += x * x
			pe += e * e
		}
		got := 10 * math.Log10(ps/pe)
		want := 6.02*float64(b) + 1.76
		if math.Abs(got-want) > 0.3 {
			t.Errorf("%d bits: SQNR %.2f dB, want %.2f dB", b, got, want)
		}
	}
}

// The mid-rise levels: 2^b of them, ±Δ/2 … ±(FS − Δ/2), clipping beyond full scale (the
// definition of a mid-rise quantiser, common practice, no source).
func TestQuantiserLevels(t *testing.T) {
	q := Quantiser{Bits: 3, FullScale: 1} // Δ = 0.25
	for _, c := range []struct{ in, out float64 }{
		{0.01, 0.125}, {-0.01, -0.125}, {0.3, 0.375}, {0.99, 0.875}, {7, 0.875}, {-7, -0.875},
	} {
		if got := q.Level(c.in); math.Abs(got-c.out) > 1e-15 {
			t.Errorf("Level(%v) = %v, want %v", c.in, got, c.out)
		}
	}
}

// A fine converter behind the AGC leaves 16-QAM at its AWGN theory; a coarse one does not.
func TestADCQAM(t *testing.T) {
	const db = 12
	m := linktest.NewModem(2, 2)
	src := &linktest.Source{N: 4000}
	e, n := linktest.BER(t, 11, 60, src, m, channel.AWGN(db), ADC(12), m.Demod())
	linktest.Within(t, "16-QAM, 12-bit ADC", e, n, linktest.BER16QAM(db))

	e, n = linktest.BER(t, 12, 60, src, m, channel.AWGN(db), ADC(3).Load(6), m.Demod())
	if float64(e)/float64(n) < 2*linktest.BER16QAM(db) {
		t.Errorf("16-QAM, 3-bit ADC: BER %.3g shows no penalty over theory %.3g", float64(e)/float64(n), linktest.BER16QAM(db))
	}
}
