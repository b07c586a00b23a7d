package fec_test

import (
	"strings"
	"testing"

	"tally/blocks/fec"
	"tally/blocks/link"
	"tally/blocks/stats"
	"tally/blocks/theory"
)

func TestPolarLengthParameters(t *testing.T) {
	for _, c := range []struct {
		code   *fec.PolarCode
		prefix string
	}{
		{fec.PolarPunctured(3, 1), "fec.PolarPunctured(3, 1): n = 3"},
		{fec.PolarShortened(70000, 10), "fec.PolarShortened(70000, 10): n = 70000"},
		{fec.PolarShortened(100, 100), "fec.PolarShortened(100, 100): k = 100"},
		{fec.PolarPunctured(100, 90).CRC(11), "fec.PolarPunctured(100, 90): CRC(11)"},
		{fec.Polar(1000, 500), "fec.Polar(1000, 500): n = 1000 must be a power of two in 4…65536 (fec.PolarPunctured"},
	} {
		if err := c.code.Err(); err == nil || !strings.HasPrefix(err.Error(), c.prefix) {
			t.Errorf("error %v, want it to start %q", err, c.prefix)
		}
	}
	c := fec.PolarShortened(768, 384)
	if c.N != 1024 || c.Sent != 768 || c.Rate() != 0.5 || c.Encoder().Rate() != 0.5 {
		t.Errorf("N %d, Sent %d, rate %v", c.N, c.Sent, c.Rate())
	}
	// The encoder sends Sent bits per word; the decoder takes Sent LLRs per word.
	l := softLink(3*384, 30, c.Encoder(), c.Decoder())
	got := run(t, l, 3, 1)
	if got[link.TapBER].Errors != 0 || got[link.TapBER].Trials != 9*384 {
		t.Errorf("noiseless: %+v", got)
	}
}

// Noiseless words decode exactly, by SC and by CRC-aided list decoding, punctured or shortened.
func TestPolarLengthNoiseless(t *testing.T) {
	for _, c := range []*fec.PolarCode{fec.PolarPunctured(600, 200), fec.PolarShortened(600, 450), fec.PolarShortened(100, 30).CRC(8)} {
		for _, L := range []int{1, 4} {
			dec := c.Decoder().List(L)
			got := run(t, softLink(c.K*2, 30, c.Encoder(), dec).Count("crc", dec.CRCFailures), 4, 2)
			if got[link.TapBER].Errors != 0 || got["crc"].Errors != 0 {
				t.Errorf("%s: %+v", dec.Name(), got)
			}
		}
	}
}

// SC on codes of 768 bits (the (1024, 384) mother code less 256 bits) at 2.5 dB: the frame error
// rate lies within the bounds the Gaussian approximation gives for the construction that
// accounts for the removed bits (as for TestPolarSCAgainstEstimate: its sum of channel error
// probabilities bounds SC's FER from above, Arıkan 2009, Proposition 2; Trifonov 2012), and
// not below the normal approximation (Polyanskiy, Poor and Verdú 2010). Shortened bits that the
// frozen bits did not fix to 0 would make nearly every frame fail here; where punctured bits
// sit relative to the frozen set is checked in TestPolarRemovedPositions. The lower side allows
// SC a quarter of the bound: the sum of the bit-channel error probabilities over-counts where
// several bit-channels fail in one frame (a factor of a few at these rates: common practice, no
// source).
func TestPolarLengthAgainstEstimate(t *testing.T) {
	const db = 2.5
	for _, c := range []*fec.PolarCode{fec.PolarPunctured(768, 384), fec.PolarShortened(768, 384)} {
		dec := c.Decoder()
		fer := run(t, softLink(c.K, db, c.Encoder(), dec), 1500, 41)[link.TapFER]
		e, _ := stats.ClopperPearson(fer.Errors, fer.Trials, 0.99)
		est := c.EstimateSC(db)
		t.Logf("%s at %g dB: FER %.3g [%.3g, %.3g], GA sum %.3g", dec.Name(), db, e.Rate, e.Low, e.High, est)
		if e.Low > est || e.High < est/4 {
			t.Errorf("%s: FER %.3g [%.3g, %.3g] not near the GA estimate %.3g", dec.Name(), e.Rate, e.Low, e.High, est)
		}
		if na := theory.NormalApprox(c.Sent, c.K, db); e.High < na {
			t.Errorf("%s: FER below the normal approximation %.3g", dec.Name(), na)
		}
	}
}

// Shortening suits high rates and puncturing low ones (common practice, no source): so says the
// construction's own estimate at 3 dB, for a rate-1/3 and a rate-3/4 code of 600 and 768 bits.
func TestPolarLengthRates(t *testing.T) {
	if p, s := fec.PolarPunctured(600, 200).EstimateSC(3), fec.PolarShortened(600, 200).EstimateSC(3); !(p < s) {
		t.Errorf("rate 1/3: punctured %.3g, shortened %.3g", p, s)
	}
	if p, s := fec.PolarPunctured(768, 576).EstimateSC(3), fec.PolarShortened(768, 576).EstimateSC(3); !(s < p) {
		t.Errorf("rate 3/4: punctured %.3g, shortened %.3g", p, s)
	}
}
