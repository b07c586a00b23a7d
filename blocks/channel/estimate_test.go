package channel_test

import (
	"math"
	"strings"
	"testing"

	"tally/blocks/channel"
	"tally/blocks/impair"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/pulse"
	"tally/blocks/source"
	"tally/blocks/stats"
	"tally/blocks/theory"
)

// runTally runs frames frames of point 0 of l with seed and returns the BER tap's sum.
func runTally(t testing.TB, l *link.Link, seed uint64, frames int) link.Tally {
	t.Helper()
	var f link.Frame
	var sum link.Tally
	c := make([]link.Tally, len(l.Taps()))
	for i := range frames {
		clear(c)
		if err := l.Run(&f, seed, 0, i, c); err != nil {
			t.Fatal(err)
		}
		sum.Add(c[0])
	}
	return sum
}

// ebn0For is the Eb/N0 (dB) at which ber(ebn0) = p, by bisection on a decreasing curve.
func ebn0For(ber func(float64) float64, p float64) float64 {
	lo, hi := -5.0, 30.0
	for range 100 {
		m := (lo + hi) / 2
		if ber(m) > p {
			lo = m
		} else {
			hi = m
		}
	}
	return (lo + hi) / 2
}

// The targets: BPSK/AWGN at 1e-9 and 1e-12 and Gray 16-QAM/AWGN at 1e-9, by importance
// sampling, within ±20 % of theory at 95 % confidence with far fewer than 1e8 symbols (here
// 1e5 or less). Theory: BPSK Q(√(2Eb/N0)) (Proakis, Digital Communications, 5th ed., 2008,
// eq. 4.3-13); 16-QAM the exact Gray BER of Cho and Yoon, "On the general BER expression of
// one- and two-dimensional amplitude modulations", IEEE Trans. Commun., 2002 (theory.QAM).
func TestImportanceAgainstTheory(t *testing.T) {
	cases := []struct {
		name   string
		m      *modem.Modem
		ber    func(float64) float64
		target float64
		frames int
	}{
		{"BPSK 1e-9", modem.BPSK(), theory.BPSK, 1e-9, 50},
		{"BPSK 1e-12", modem.BPSK(), theory.BPSK, 1e-12, 50},
		{"16-QAM 1e-9", modem.QAM(16), func(x float64) float64 { return theory.QAM(16, x) }, 1e-9, 50},
	}
	for _, c := range cases {
		db := ebn0For(c.ber, c.target)
		want := c.ber(db)
		l := link.Chain(source.Random(1024*c.m.Bits), c.m.Mod(), channel.AWGN(db), c.m.Demod()).Estimate("importance")
		tl := runTally(t, l, 7, c.frames)
		e, err := stats.Weighted(tl, 0.95)
		if err != nil {
			t.Fatal(err)
		}
		t.Logf("%s: Eb/N0 %.3f dB, %d symbols: %.4g [%.4g, %.4g], theory %.4g, effective %.0f", c.name, db,
			tl.Trials/int64(c.m.Bits), e.Rate, e.Low, e.High, want, e.Effective)
		if e.Degenerate || !e.Contains(want) || e.Low < 0.8*want || e.High > 1.2*want {
			t.Errorf("%s: interval [%.4g, %.4g] (degenerate %v) not within ±20 %% around theory %.4g", c.name, e.Low, e.High, e.Degenerate, want)
		}
		if !strings.HasPrefix(e.Method, "importance-sampling") {
			t.Errorf("method %q", e.Method)
		}
	}
}

// The semi-analytic estimator on AWGN links reproduces the closed forms: for BPSK every
// decision's tail is Q(√(2Eb/N0)) exactly (Proakis, eq. 4.3-13); for Gray 16-QAM the data
// average of the per-symbol tails converges to Cho and Yoon's exact BER (IEEE Trans. Commun.,
// 2002), within the estimator's interval.
func TestSemiAnalyticAgainstTheory(t *testing.T) {
	for _, db := range []float64{4, 10, 14} {
		l := link.Chain(source.Random(1024), modem.BPSK().Mod(), channel.AWGN(db), modem.BPSK().Demod()).Estimate("semi-analytic")
		e, err := stats.Weighted(runTally(t, l, 1, 10), 0.95)
		if err != nil {
			t.Fatal(err)
		}
		if want := theory.BPSK(db); math.Abs(e.Rate-want) > 1e-9*want {
			t.Errorf("BPSK %v dB: %.10g, want %.10g", db, e.Rate, want)
		}
	}
	m := modem.QAM(16)
	for _, db := range []float64{6, 12, 16} {
		l := link.Chain(source.Random(4096), m.Mod(), channel.AWGN(db), m.Demod()).Estimate("semi-analytic")
		e, err := stats.Weighted(runTally(t, l, 1, 40), 0.99)
		if err != nil {
			t.Fatal(err)
		}
		want := theory.QAM(16, db)
		t.Logf("16-QAM %v dB: %.5g [%.5g, %.5g], theory %.5g", db, e.Rate, e.Low, e.High, want)
		if !e.Contains(want) || e.High-e.Low > 0.1*want {
			t.Errorf("16-QAM %v dB: [%.5g, %.5g] misses theory %.5g or is wider than 10 %%", db, e.Low, e.High, want)
		}
	}
}

// Coverage of the importance-sampling 95 % interval at known BERs: 500 replications each
// (different seeds) of Gray 16-QAM at the Eb/N0 where Cho and Yoon's exact BER (IEEE Trans.
// Commun., 2002) is 1e-6 and 1e-12, and of BPSK where Q(√(2Eb/N0)) is 1e-12, with 10 or 20
// frames of 256 symbols. A valid 95 % interval covers the truth in about 95 % of replications;
// the issue asks for at least 0.93 (the README reports the figures).
func TestImportanceCoverage(t *testing.T) {
	if testing.Short() {
		t.Skip("1500 replications")
	}
	qam := func(x float64) float64 { return theory.QAM(16, x) }
	for _, c := range []struct {
		m      *modem.Modem
		ber    func(float64) float64
		p      float64
		frames int
	}{
		{modem.QAM(16), qam, 1e-6, 20},
		{modem.QAM(16), qam, 1e-12, 10},
		{modem.BPSK(), theory.BPSK, 1e-12, 10},
	} {
		db := ebn0For(c.ber, c.p)
		want := c.ber(db)
		l := link.Chain(source.Random(256*c.m.Bits), c.m.Mod(), channel.AWGN(db), c.m.Demod()).Estimate("importance")
		const reps = 500
		covered, degenerate := 0, 0
		for s := range reps {
			e, err := stats.Weighted(runTally(t, l, uint64(1000+s), c.frames), 0.95)
			if err != nil {
				t.Fatal(err)
			}
			if e.Contains(want) {
				covered++
			}
			if e.Degenerate {
				degenerate++
			}
		}
		cov := float64(covered) / reps
		t.Logf("%s at %g, %d frames: coverage %d/%d = %.3f (%d degenerate)", c.m.Name(), c.p, c.frames, covered, reps, cov, degenerate)
		if cov < 0.93 {
			t.Errorf("%s at %g: coverage %.3f below 0.93", c.m.Name(), c.p, cov)
		}
	}
}

// A link with no closed form, QPSK through a two-tap ISI channel (h = [1, 0.25], scaled to
// unit energy): importance sampling and the semi-analytic estimator agree with plain Monte
// Carlo within the intervals at Eb/N0 11 dB (BER near 1e-4), then both reach far lower rates,
// where they agree with each other. (Method of comparison: common practice, no source.)
func TestEstimatorsAgainstMonteCarloISI(t *testing.T) {
	m := modem.QPSK()
	build := func(db float64) *link.Link {
		return link.Chain(source.Random(4096), m.Mod(), channel.Multipath([]complex128{1, 0.25}), channel.AWGN(db), m.Demod())
	}
	db := 11.0
	mc := runTally(t, build(db), 3, 1200)
	plain, err := stats.ClopperPearson(mc.Errors, mc.Trials, 0.99)
	if err != nil {
		t.Fatal(err)
	}
	is, _ := stats.Weighted(runTally(t, build(db).Estimate("importance"), 3, 100), 0.99)
	sa, _ := stats.Weighted(runTally(t, build(db).Estimate("semi-analytic"), 3, 100), 0.99)
	t.Logf("11 dB: count %.4g [%.4g, %.4g] (%d errors); importance %.4g [%.4g, %.4g]; semi-analytic %.4g [%.4g, %.4g]",
		plain.Rate, plain.Low, plain.High, mc.Errors, is.Rate, is.Low, is.High, sa.Rate, sa.Low, sa.High)
	overlap := func(a, b stats.Estimate) bool { return a.Low <= b.High && b.Low <= a.High }
	if !overlap(plain, is.Estimate) || !overlap(plain, sa.Estimate) {
		t.Errorf("11 dB: the estimators disagree with plain Monte Carlo")
	}
	db = 17
	is, _ = stats.Weighted(runTally(t, build(db).Estimate("importance"), 5, 100), 0.99)
	sa, _ = stats.Weighted(runTally(t, build(db).Estimate("semi-analytic"), 5, 100), 0.99)
	t.Logf("17 dB: importance %.4g [%.4g, %.4g] (effective %.0f); semi-analytic %.4g [%.4g, %.4g]", is.Rate, is.Low, is.High, is.Effective, sa.Rate, sa.Low, sa.High)
	if !(sa.Rate < 1e-11) || !overlap(is.Estimate, sa.Estimate) || is.Degenerate {
		t.Errorf("17 dB: importance sampling and semi-analytic disagree")
	}
}

// The link with no closed form: root-raised-cosine 16-QAM (roll-off 0.25) through a
// Rapp amplifier (p = 2) at 6 dB input back-off, AWGN, matched filter and sampler. The
// semi-analytic estimate agrees with plain counting at BER near 1e-4, and reaches below 1e-12
// at 20 dB with a finite, non-degenerate interval. (Method of comparison: common practice, no
// source; the Rapp model: Rapp, "Effects of HPA-nonlinearity on a 4-DPSK/OFDM-signal for a
// digital sound broadcasting system", 1991.)
func TestSemiAnalyticAmplifierAgainstMonteCarlo(t *testing.T) {
	if testing.Short() {
		t.Skip("counts 2.5e6 bits through a pulse-shaped link")
	}
	m := modem.QAM(16)
	build := func(db float64) *link.Link {
		p := pulse.RRC(0.25)
		return link.Chain(source.Random(4096), m.Mod(), p.Shape(), impair.Rapp(6, 2), channel.AWGN(db), p.Match(), pulse.Sample(), m.Demod())
	}
	mc := runTally(t, build(12), 11, 600)
	plain, err := stats.ClopperPearson(mc.Errors, mc.Trials, 0.99)
	if err != nil {
		t.Fatal(err)
	}
	sa, _ := stats.Weighted(runTally(t, build(12).Estimate("semi-analytic"), 11, 20), 0.99)
	t.Logf("12 dB: count %.4g [%.4g, %.4g] (%d errors); semi-analytic %.4g [%.4g, %.4g]", plain.Rate, plain.Low, plain.High, mc.Errors, sa.Rate, sa.Low, sa.High)
	if !(plain.Low <= sa.High && sa.Low <= plain.High) {
		t.Errorf("12 dB: semi-analytic disagrees with counting")
	}
	low, _ := stats.Weighted(runTally(t, build(20).Estimate("semi-analytic"), 11, 400), 0.95)
	t.Logf("20 dB: semi-analytic %.4g [%.4g, %.4g], effective %.0f", low.Rate, low.Low, low.High, low.Effective)
	if !(low.High < 1e-12 && low.Low > 0) || low.Degenerate {
		t.Errorf("20 dB: %.4g [%.4g, %.4g] (degenerate %v), want a non-degenerate estimate below 1e-12", low.Rate, low.Low, low.High, low.Degenerate)
	}
}

// The estimators keep the blocks' contract of no allocation per frame (common practice, no
// source: see DEVELOPERS.md).
func TestEstimatorsDoNotAllocate(t *testing.T) {
	m := modem.QAM(16)
	for _, est := range []string{"importance", "semi-analytic"} {
		l := link.Chain(source.Random(4096), m.Mod(), channel.AWGN(12), m.Demod()).Estimate(est)
		var f link.Frame
		c := make([]link.Tally, len(l.Taps()))
		i := 0
		run := func() {
			if err := l.Run(&f, 1, 0, i, c); err != nil {
				t.Fatal(err)
			}
			i++
		}
		run()
		if a := testing.AllocsPerRun(20, run); a != 0 {
			t.Errorf("%s: %v allocations per frame", est, a)
		}
	}
}
