package carrier

import (
	"math"
	"math/cmplx"
	"strings"
	"testing"

	"tally/blocks/channel"
	"tally/blocks/impair"
	"tally/blocks/internal/linktest"
	"tally/blocks/link"
	"tally/blocks/rng"
	"tally/blocks/stats"
)

// Noise-free, a constant offset inside ±π/S and a frequency offset that turns the carrier
// several times over the frame are removed: the unwrapped track follows the ramp. Away from
// the frame's ends (where the window is cut short and no longer centred), MPower's estimate
// over a centred odd window of a linear phase is exact. Blind phase search minimises
// Σ|p_i|²(δ_i − φ)² (small angles), a weighted mean of the window's phases δ_i: its estimate
// lies within the phase span of half a window, (L−1)/2·2π·f·T, plus half its test-phase step
// π/(S·B); with a constant phase, within the half step (geometry of the estimators, common
// practice, no source).
func TestTrackNoiseFree(t *testing.T) {
	const ft = 1e-3
	half := math.Pi / (4 * 32)
	for _, c := range []struct {
		name string
		b    link.Block
		bits int
		ft   float64
		tol  float64 // radians
	}{
		{"MPower", MPower(17), 1, ft, 1e-9},
		{"BlindPhase", BlindPhase(17, 32), 2, 0, half + 1e-9},
		{"BlindPhase", BlindPhase(17, 32), 2, ft, half + 8*2*math.Pi*ft},
	} {
		m := linktest.NewModem(c.bits, c.bits)
		f := &link.Frame{}
		src := &linktest.Source{N: 4000 * c.bits}
		r := rng.New(1)
		for _, b := range []link.Block{src, m, impair.Phase(20), impair.Frequency(c.ft), c.b} {
			if err := b.Process(f, r); err != nil {
				t.Fatal(err)
			}
		}
		tx := &link.Frame{}
		_ = src.Process(tx, rng.New(1))
		m2 := linktest.NewModem(c.bits, c.bits)
		_ = m2.Process(tx, nil)
		var worst float64
		for i := 8; i < len(f.Samples)-8; i++ {
			worst = math.Max(worst, math.Abs(cmplx.Phase(f.Samples[i]*cmplx.Conj(tx.Samples[i]))))
		}
		if worst > c.tol {
			t.Errorf("%s: residual phase up to %.3g rad, want ≤ %.3g (total turn %.1f cycles)", c.name, worst, c.tol, c.ft*float64(len(f.Samples)))
		}
	}
}

// The ambiguity is a quarter turn for QPSK: an offset of 60° (beyond ±45°) leaves the signal
// turned by exactly 90° (package doc).
func TestAmbiguity(t *testing.T) {
	m := linktest.NewModem(1, 1)
	f := &link.Frame{}
	src := &linktest.Source{N: 200}
	for _, b := range []link.Block{src, m, impair.Phase(60), MPower(8)} {
		if err := b.Process(f, rng.New(2)); err != nil {
			t.Fatal(err)
		}
	}
	rx := append([]complex128(nil), f.Samples...)
	tx := linktest.NewModem(1, 1)
	_ = tx.Process(f, nil) // f.Coded is unchanged: remap it
	for i, y := range rx {
		if d := cmplx.Phase(y*cmplx.Conj(tx.Symbols()[i])) * 180 / math.Pi; math.Abs(d-90) > 1e-6 {
			t.Fatalf("symbol %d turned by %.4f°, want 90°", i, d)
		}
	}
}

// closeToIdeal checks a recovered BER against theory: no better than ideal (the 99 % interval
// reaches the ideal BER) and no worse than the ideal at penalty dB less Eb/N0.
func closeToIdeal(t *testing.T, what string, e, n int64, ideal, worse float64) {
	t.Helper()
	est, err := stats.ClopperPearson(e, n, 0.99)
	if err != nil {
		t.Fatal(err)
	}
	if est.High < ideal || est.Low > worse {
		t.Errorf("%s: BER %.4g (%d/%d, 99%% [%.4g, %.4g]); want between ideal %.4g and %.4g", what, est.Rate, e, n, est.Low, est.High, ideal, worse)
	}
}

// With a constant offset and moderate phase noise, recovered QPSK (M-th power) and 16-QAM
// (blind phase search) come within 0.5 dB of the AWGN BER of the ideal coherent receiver
// (Proakis and Salehi 2008; Cho and Yoon 2002): the window averages the noise while the
// phase noise barely moves within it. The same links without recovery are far off (the test
// has teeth).
func TestRecoveredBER(t *testing.T) {
	const penalty = 0.5
	qpsk := linktest.NewModem(1, 1)
	src := &linktest.Source{N: 4096}
	const dbq = 6.0
	off, pn := impair.Phase(25), impair.PhaseNoise(1e-4)
	e, n := linktest.BER(t, 31, 40, src, qpsk, off, pn, channel.AWGN(dbq), MPower(32), qpsk.Demod())
	closeToIdeal(t, "QPSK, M-th power", e, n, linktest.BERQPSK(dbq), linktest.BERQPSK(dbq-penalty))
	e, n = linktest.BER(t, 31, 10, src, qpsk, off, pn, channel.AWGN(dbq), qpsk.Demod())
	if r := float64(e) / float64(n); r < 3*linktest.BERQPSK(dbq) {
		t.Errorf("QPSK without recovery: BER %.3g not clearly above theory", r)
	}

	qam := linktest.NewModem(2, 2)
	const dbm = 13.0
	off, pn = impair.Phase(15), impair.PhaseNoise(1e-5)
	e, n = linktest.BER(t, 32, 30, src, qam, off, pn, channel.AWGN(dbm), BlindPhase(32, 32), qam.Demod())
	closeToIdeal(t, "16-QAM, blind phase search", e, n, linktest.BER16QAM(dbm), linktest.BER16QAM(dbm-penalty))
	e, n = linktest.BER(t, 32, 10, src, qam, off, pn, channel.AWGN(dbm), qam.Demod())
	if r := float64(e) / float64(n); r < 3*linktest.BER16QAM(dbm) {
		t.Errorf("16-QAM without recovery: BER %.3g not clearly above theory", r)
	}
}

// Bad parameters and unsuitable frames are reported with the block and the value.
func TestErrors(t *testing.T) {
	for _, c := range []struct {
		b    link.Checked
		want string
	}{
		{MPower(0), "carrier.MPower: window 0"},
		{MPower(8).Order(1), "carrier.MPower: order M = 1"},
		{MPower(8).Weight(-1), "carrier.MPower: weight n = -1"},
		{BlindPhase(0, 32), "carrier.BlindPhase: window 0"},
		{BlindPhase(8, 1), "carrier.BlindPhase: test phases 1"},
		{BlindPhase(8, 8).Symmetric(0), "carrier.BlindPhase: symmetry 0"},
	} {
		err := c.b.Err()
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("got %v, want a message containing %q", err, c.want)
		}
	}
	f := &link.Frame{SPS: 4, Samples: make([]complex128, 8), Constellation: []complex128{1, -1}}
	if err := MPower(4).Process(f, rng.New(1)); err == nil || !strings.Contains(err.Error(), "SPS = 4") {
		t.Errorf("SPS 4: %v", err)
	}
	f = &link.Frame{SPS: 1, Samples: make([]complex128, 8)}
	if err := BlindPhase(4, 8).Process(f, rng.New(1)); err == nil || !strings.Contains(err.Error(), "constellation") {
		t.Errorf("no constellation: %v", err)
	}
}
