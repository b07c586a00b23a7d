package channel_test

import (
	"math"
	"math/cmplx"
	"strings"
	"testing"

	"tally/blocks/channel"
	"tally/blocks/internal/linktest"
	"tally/blocks/link"
	"tally/blocks/rng"
	"tally/blocks/theory"
)

// bpskRayleigh is the average BER of coherent BPSK in flat Rayleigh fading with average
// Eb/N0 g: Pb = ½(1 − √(g/(1+g))) (Proakis, Digital Communications, 4th ed., 2001, eq. 14.3-7).
func bpskRayleigh(g float64) float64 { return 0.5 * (1 - math.Sqrt(g/(1+g))) }

func TestRayleighBPSKPerfectCSI(t *testing.T) {
	for _, db := range []float64{0, 6, 12} {
		l := link.Chain(&linktest.BPSK{N: 4096}, channel.Rayleigh(), channel.AWGN(db), channel.KnownGain(), &linktest.BPSKDetector{})
		e := linktest.Estimate(t, l, 100, 7)
		want := bpskRayleigh(math.Pow(10, db/10))
		if want < e.Low || want > e.High {
			t.Errorf("Eb/N0 %v dB: MC BER %.5g, 99%% interval [%.5g, %.5g] misses the closed form %.5g", db, e.Rate, e.Low, e.High, want)
		}
	}
}

// BPSK in Rician fading with perfect CSI against the MGF integral of theory.BPSKRician
// (Simon and Alouini, Digital Communication over Fading Channels, 2nd ed., 2005, ch. 8).
// Per-symbol fading only: with block fading the errors of a block are correlated and the
// binomial interval would be too narrow.
func TestRicianBPSKPerfectCSI(t *testing.T) {
	for _, tc := range []struct {
		k, db float64
		hold  int
	}{{4, 8, 1}, {1, 4, 1}, {10, 6, 1}} {
		l := link.Chain(&linktest.BPSK{N: 4096}, channel.Rician(tc.k).Hold(tc.hold), channel.AWGN(tc.db), channel.KnownGain(), &linktest.BPSKDetector{})
		e := linktest.Estimate(t, l, 100, 21)
		want := theory.BPSKRician(tc.k, tc.db)
		if want < e.Low || want > e.High {
			t.Errorf("K = %v, %v dB, hold %d: MC BER %.5g, 99%% interval [%.5g, %.5g] misses %.5g", tc.k, tc.db, tc.hold, e.Rate, e.Low, e.High, want)
		}
	}
}

// With the phase-only correction BPSK hard decisions are as good as with full correction:
// scaling by a positive number does not move a sign decision (common practice, no source).
func TestDerotateBPSK(t *testing.T) {
	db := 6.0
	l := link.Chain(&linktest.BPSK{N: 4096}, channel.Rayleigh(), channel.AWGN(db), channel.Derotate(), &linktest.BPSKDetector{})
	e := linktest.Estimate(t, l, 100, 8)
	want := bpskRayleigh(math.Pow(10, db/10))
	if want < e.Low || want > e.High {
		t.Errorf("MC BER %.5g, 99%% interval [%.5g, %.5g] misses %.5g", e.Rate, e.Low, e.High, want)
	}
}

// Without channel knowledge the uniform phase of the Rayleigh gain makes coherent BPSK a coin
// toss (common practice, no source): the BER must be near 1/2 even at high Eb/N0.
func TestRayleighNoCSIFails(t *testing.T) {
	l := link.Chain(&linktest.BPSK{N: 4096}, channel.Rayleigh(), channel.AWGN(30), &linktest.BPSKDetector{})
	e := linktest.Estimate(t, l, 20, 9)
	if e.Low > 0.5 || e.High < 0.5 {
		t.Errorf("no-CSI BER %.4f, 99%% interval [%.4f, %.4f] does not contain 1/2", e.Rate, e.Low, e.High)
	}
}

// gains runs a fading channel over frames of n symbols at sps samples per symbol (a constant
// signal with symmetric padding of pad samples) and returns every frame's f.Gain and samples.
func gains(t *testing.T, c *channel.Fading, frames, n, sps, pad int, seed uint64) (g, x [][]complex128) {
	t.Helper()
	if err := c.Err(); err != nil {
		t.Fatal(err)
	}
	var s rng.Stream
	for i := range frames {
		f := link.Frame{SPS: sps, Symbols: n, Es: 1, BitsPerSymbol: 1, CodeRate: 1}
		f.Samples = make([]complex128, (n-1)*sps+1+2*pad)
		for j := range f.Samples {
			f.Samples[j] = 1
		}
		s.Reset(rng.Key(seed, 0, i, 1))
		if err := c.Process(&f, &s); err != nil {
			t.Fatal(err)
		}
		g = append(g, append([]complex128(nil), f.Gain...))
		x = append(x, f.Samples)
	}
	return g, x
}

// The time-correlated gain must have the Clarke autocorrelation R(τ) = J0(2π fD τ)
// (Clarke, "A statistical theory of mobile-radio reception", Bell Syst. Tech. J., 1968;
// Jakes, Microwave Mobile Communications, 1974), real, with R(0) = E|h|² = 1.
// Tolerance 0.025: the estimate averages 300 frames × 3000 symbols with a coherence time of
// about 1/fD = 50 symbols; over 8 other seeds the worst deviation over these lags was
// 0.005–0.012.
func TestDopplerAutocorrelation(t *testing.T) {
	fd := 0.02
	g, _ := gains(t, channel.Rayleigh().Doppler(fd), 300, 3000, 1, 0, 11)
	for _, tau := range []int{0, 5, 10, 20, 30, 45, 60, 90} {
		var sum complex128
		var cnt int
		for _, h := range g {
			for k := 0; k+tau < len(h); k++ {
				sum += h[k] * cmplx.Conj(h[k+tau])
				cnt++
			}
		}
		r := sum / complex(float64(cnt), 0)
		want := math.J0(2 * math.Pi * fd * float64(tau))
		if math.Abs(real(r)-want) > 0.025 || math.Abs(imag(r)) > 0.025 {
			t.Errorf("τ = %d: R = %.4f%+.4fi, want J0 = %.4f ± 0.025", tau, real(r), imag(r), want)
		}
	}
}

// |h|² of Rayleigh fading is exponential with mean 1: P(|h|² < x) = 1 − e^{−x} (common
// practice, no source). Checked for per-symbol draws and for the sum-of-sinusoids process
// (whose law is only asymptotically Gaussian in M; tolerance 0.01 absolute on the CDF, about 4
// binomial standard errors of the correlated Doppler samples).
func TestRayleighEnvelope(t *testing.T) {
	for _, c := range []*channel.Fading{channel.Rayleigh(), channel.Rayleigh().Doppler(0.05)} {
		g, _ := gains(t, c, 100, 2000, 1, 0, 12)
		for _, x := range []float64{0.01, 0.1, 0.5, 1, 2, 4} {
			var below, n int
			for _, h := range g {
				for _, v := range h {
					if real(v)*real(v)+imag(v)*imag(v) < x {
						below++
					}
					n++
				}
			}
			p := float64(below) / float64(n)
			if want := 1 - math.Exp(-x); math.Abs(p-want) > 0.01 {
				t.Errorf("Doppler %v: P(|h|² < %v) = %.4f, want %.4f ± 0.01", c.FD, x, p, want)
			}
		}
	}
}

// Rician moments: E|h|² = 1 and E|h|⁴ = (K² + 4K + 2)/(K+1)², from the amount of fading
// AF = (1+2K)/(1+K)² (Simon and Alouini, Digital Communication over Fading Channels, 2nd ed.,
// 2005, Table 2.1, from memory). Tolerance 2 %: 400 000 draws give standard errors near 0.3 %.
func TestRicianMoments(t *testing.T) {
	for _, k := range []float64{0, 1, 5} {
		for _, c := range []*channel.Fading{channel.Rician(k), channel.Rician(k).Doppler(0.1).LOSAngle(60)} {
			g, _ := gains(t, c, 200, 2000, 1, 0, 13)
			var m2, m4 float64
			var n int
			for _, h := range g {
				for _, v := range h {
					p := real(v)*real(v) + imag(v)*imag(v)
					m2 += p
					m4 += p * p
					n++
				}
			}
			m2 /= float64(n)
			m4 /= float64(n)
			want4 := (k*k + 4*k + 2) / ((k + 1) * (k + 1))
			if math.Abs(m2-1) > 0.02 || math.Abs(m4/want4-1) > 0.02 {
				t.Errorf("K = %v, Doppler %v: E|h|² = %.4f (want 1), E|h|⁴ = %.4f (want %.4f)", k, c.FD, m2, m4, want4)
			}
		}
	}
}

// Block fading holds one gain for Hold symbols, then draws an independent one.
func TestHold(t *testing.T) {
	g, _ := gains(t, channel.Rayleigh().Hold(8), 2, 64, 1, 0, 14)
	for k := 1; k < 64; k++ {
		same := g[0][k] == g[0][k-1]
		if same != (k%8 != 0) {
			t.Fatalf("symbol %d: gain %v after %v; want a new gain every 8 symbols", k, g[0][k], g[0][k-1])
		}
	}
	g, _ = gains(t, channel.Rician(2).PerFrame(), 2, 64, 1, 0, 14)
	for k := range g[0] {
		if g[0][k] != g[0][0] {
			t.Fatalf("PerFrame: gain %d differs from gain 0", k)
		}
	}
	if g[0][0] == g[1][0] {
		t.Fatal("PerFrame: two frames drew the same gain")
	}
}

// On an oversampled frame f.Gain[k] must be the multiplier at symbol k's centre sample.
func TestOversampledGain(t *testing.T) {
	const n, sps, pad = 50, 4, 10
	for _, c := range []*channel.Fading{channel.Rayleigh(), channel.Rayleigh().Doppler(0.05)} {
		g, x := gains(t, c, 1, n, sps, pad, 15)
		for k := range n {
			if got := x[0][pad+k*sps]; got != g[0][k] {
				t.Fatalf("Doppler %v, symbol %d: centre sample multiplied by %v, f.Gain says %v", c.FD, k, got, g[0][k])
			}
		}
	}
}

// Frames are independent: the same frame index and seed give the same gains (replay), and
// processing other frames first changes nothing.
func TestFadingReplay(t *testing.T) {
	c := channel.Rayleigh().Doppler(0.01)
	a, _ := gains(t, c, 3, 100, 1, 0, 16)
	b, _ := gains(t, c, 3, 100, 1, 0, 16)
	for i := range a {
		for k := range a[i] {
			if a[i][k] != b[i][k] {
				t.Fatalf("frame %d symbol %d differs on replay", i, k)
			}
		}
	}
}

func TestFadingErrors(t *testing.T) {
	for _, tc := range []struct {
		c    *channel.Fading
		want string
	}{
		{channel.Rician(-1), "channel.Rician: K = -1"},
		{channel.Rician(math.NaN()), "K = NaN"},
		{channel.RicianDB(math.NaN()), "channel.RicianDB: K = NaN dB"},
		{channel.Rayleigh().Doppler(-0.1), "Doppler fD·T = -0.1"},
		{channel.Rayleigh().Hold(-2), "Hold = -2"},
		{channel.Rayleigh().Sinusoids(2), "Sinusoids M = 2"},
	} {
		if err := tc.c.Err(); err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("error %v, want one containing %q", err, tc.want)
		}
	}
	if err := channel.RicianDB(-math.Inf(1)).Err(); err != nil {
		t.Errorf("K = −∞ dB is Rayleigh, got %v", err)
	}
}
