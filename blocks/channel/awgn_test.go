package channel_test

import (
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/stat"

	"tally/blocks/channel"
	"tally/blocks/link"
	"tally/blocks/rng"
)

// awgnNoise passes a frame of n zero samples with the given energy bookkeeping through c and
// returns the frame (the samples are then the noise alone).
func awgnNoise(t *testing.T, c *channel.WhiteNoise, n int, es float64, bps, sps int, rate float64, real bool) *link.Frame {
	t.Helper()
	f := &link.Frame{Samples: make([]complex128, n), SPS: sps, Symbols: n / sps, BitsPerSymbol: bps,
		CodeRate: rate, Es: es, Real: real}
	if err := c.Process(f, rng.New(uint64(n)+uint64(bps))); err != nil {
		t.Fatal(err)
	}
	return f
}

func TestAWGNNoiseVariancePerDimension(t *testing.T) {
	// Complex baseband white noise of density N0 has variance N0/2 in each real dimension per
	// sample, with N0 from the trade's definitions (common practice, no source):
	//   Eb/N0:  N0 = Es / (Eb/N0 · bits per symbol · code rate)
	//   Es/N0:  N0 = Es / (Es/N0)
	//   SNR:    N0 = (Es/SPS) / SNR, the signal power per sample over the noise power per sample.
	// The sample variance of n = 2e5 Gaussian values has relative standard deviation √(2/n)
	// = 0.32 %, so a 1.5 % tolerance is a 4.7σ check.
	const n = 200000
	cases := []struct {
		name     string
		c        *channel.WhiteNoise
		es       float64
		bps, sps int
		rate     float64
		n0       float64
	}{
		{"Eb/N0 6 dB, 16-QAM, rate 1/2", channel.AWGN(6), 1, 4, 1, 0.5, 1 / (math.Pow(10, 0.6) * 4 * 0.5)},
		{"Eb/N0 3 dB, BPSK, Es = 2, SPS 4", channel.AWGN(3), 2, 1, 4, 1, 2 / math.Pow(10, 0.3)},
		{"Es/N0 10 dB", channel.AWGNEsN0(10), 1, 3, 1, 1, 0.1},
		{"Es/N0 −3 dB, Es = 4", channel.AWGNEsN0(-3), 4, 2, 1, 0.75, 4 / math.Pow(10, -0.3)},
		{"SNR 0 dB, SPS 1", channel.AWGNSNR(0), 1, 2, 1, 1, 1},
		{"SNR 7 dB, SPS 8", channel.AWGNSNR(7), 1, 2, 8, 1, 1 / (8 * math.Pow(10, 0.7))},
	}
	for _, c := range cases {
		f := awgnNoise(t, c.c, n, c.es, c.bps, c.sps, c.rate, false)
		if math.Abs(f.N0-c.n0) > 1e-12*c.n0 {
			t.Errorf("%s: f.N0 = %v, want %v", c.name, f.N0, c.n0)
		}
		re, im := make([]float64, n), make([]float64, n)
		for i, v := range f.Samples {
			re[i], im[i] = real(v), imag(v)
		}
		for dim, x := range [][]float64{re, im} {
			mean, v := stat.MeanVariance(x, nil)
			if math.Abs(v/(c.n0/2)-1) > 0.015 {
				t.Errorf("%s: variance of dimension %d = %v, N0/2 = %v", c.name, dim, v, c.n0/2)
			}
			if math.Abs(mean) > 5*math.Sqrt(c.n0/2/n) {
				t.Errorf("%s: mean of dimension %d = %v", c.name, dim, mean)
			}
		}
		if r := stat.Correlation(re, im, nil); math.Abs(r) > 5/math.Sqrt(n) {
			t.Errorf("%s: I and Q correlated, r = %v", c.name, r)
		}
	}
}

func TestAWGNRealSignalLeavesImaginaryPending(t *testing.T) {
	// On a real-axis signal only the real noise is drawn; MakeComplex later adds the imaginary
	// half with the same variance N0/2.
	const n = 200000
	f := awgnNoise(t, channel.AWGN(4), n, 1, 1, 1, 1, true)
	n0 := 1 / math.Pow(10, 0.4)
	if math.Abs(f.PendingImagSigma-math.Sqrt(n0/2)) > 1e-12 {
		t.Errorf("PendingImagSigma = %v, want √(N0/2) = %v", f.PendingImagSigma, math.Sqrt(n0/2))
	}
	re, im := make([]float64, n), make([]float64, n)
	for i, v := range f.Samples {
		if imag(v) != 0 {
			t.Fatal("imaginary noise drawn on a real signal")
		}
		re[i] = real(v)
	}
	f.MakeComplex(rng.New(5))
	for i, v := range f.Samples {
		if real(v) != re[i] {
			t.Fatal("MakeComplex changed the real part")
		}
		im[i] = imag(v)
	}
	for dim, x := range [][]float64{re, im} {
		if v := stat.Variance(x, nil); math.Abs(v/(n0/2)-1) > 0.015 {
			t.Errorf("dimension %d: variance %v, N0/2 = %v", dim, v, n0/2)
		}
	}
}

func TestAWGNErrors(t *testing.T) {
	for _, c := range []*channel.WhiteNoise{channel.AWGN(math.NaN()), channel.AWGNEsN0(math.Inf(1)), channel.AWGNSNR(math.Inf(-1))} {
		if err := c.Err(); err == nil || !strings.Contains(err.Error(), c.Name()+": level") {
			t.Errorf("%s: error %v", c.Name(), err)
		}
	}
	// Eb/N0 needs the bits per symbol of a modulator.
	f := &link.Frame{Samples: make([]complex128, 4), SPS: 1, Es: 1}
	if err := channel.AWGN(5).Process(f, rng.New(1)); err == nil || !strings.Contains(err.Error(), "modulator") {
		t.Errorf("no modulator: error %v", err)
	}
}
