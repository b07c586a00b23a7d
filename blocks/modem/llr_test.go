package modem_test

import (
	"math"
	"math/cmplx"
	"testing"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/integrate/quad"

	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/rng"
)

// bruteLLR is the bit LLR from the definition, by full search over the labelled points with
// gonum's log-sum-exp: log Σ_{b=0} e^{−|y−g·s|²/N0} − log Σ_{b=1} e^{−|y−g·s|²/N0}, or the
// max-log version; and the nearest point's label.
func bruteLLR(p []complex128, k int, y, g complex128, n0 float64, exact bool) ([]float64, int) {
	out := make([]float64, k)
	best, bd := 0, math.Inf(1)
	for l, s := range p {
		if d := cmplx.Abs(y - g*s); d < bd {
			best, bd = l, d
		}
	}
	for j := range k {
		var m0, m1 []float64
		for l, s := range p {
			e := y - g*s
			v := -(real(e)*real(e) + imag(e)*imag(e)) / n0
			if l>>(k-1-j)&1 == 0 {
				m0 = append(m0, v)
			} else {
				m1 = append(m1, v)
			}
		}
		if exact {
			out[j] = floats.LogSumExp(m0) - floats.LogSumExp(m1)
		} else {
			out[j] = floats.Max(m0) - floats.Max(m1)
		}
	}
	return out, best
}

func TestCoherentLLRsAndDecisionsAgainstFullSearch(t *testing.T) {
	for name, m := range coherent() {
		k := m.Bits
		p := m.Points()
		n := 60 * k
		for _, db := range []float64{0, 8} {
			f := received(t, m, n, db, 7)
			hard := detect(t, m.Demod(), f)
			maxlog := detect(t, m.Demod().MaxLog(), f)
			exact := detect(t, m.Demod().LogMAP(), f)
			for i, y := range f.Samples {
				wantE, near := bruteLLR(p, k, y, 1, f.N0, true)
				wantM, _ := bruteLLR(p, k, y, 1, f.N0, false)
				for j := range k {
					b := i*k + j
					if got := hard.Hard[b]; got != byte(near>>(k-1-j)&1) {
						t.Fatalf("%s %v dB symbol %d bit %d: hard %d, nearest point %b", name, db, i, j, got, near)
					}
					if math.Abs(maxlog.LLR[b]-wantM[j]) > 1e-9*(1+math.Abs(wantM[j])) {
						t.Fatalf("%s: max-log LLR %v, full search %v", name, maxlog.LLR[b], wantM[j])
					}
					if math.Abs(exact.LLR[b]-wantE[j]) > 1e-9*(1+math.Abs(wantE[j])) {
						t.Fatalf("%s: log-MAP LLR %v, full search %v", name, exact.LLR[b], wantE[j])
					}
					// The max-log sign is the nearest-point decision (common practice, no source).
					if maxlog.Hard[b] != hard.Hard[b] || (maxlog.LLR[b] < 0) != (hard.Hard[b] == 1) {
						t.Fatalf("%s: max-log sign disagrees with the hard decision", name)
					}
					if (exact.LLR[b] < 0) != (exact.Hard[b] == 1) {
						t.Fatalf("%s: log-MAP hard decision is not the LLR sign", name)
					}
				}
			}
		}
	}
}

func TestBPSKLLRIsTwoYOverSigmaSquared(t *testing.T) {
	// The textbook BPSK LLR in AWGN, L = 2y/σ² with σ² = N0/2 (e.g. Ryan and Lin, Channel
	// Codes: Classical and Modern, 2009, ch. 5; from memory).
	m := modem.BPSK()
	f := received(t, m, 500, 3, 11)
	g := detect(t, m.Demod().LogMAP(), f)
	s2 := f.N0 / 2
	for i, y := range f.Samples {
		if want := 2 * real(y) / s2; math.Abs(g.LLR[i]-want) > 1e-12*(1+math.Abs(want)) {
			t.Fatalf("LLR %v, 2y/σ² %v", g.LLR[i], want)
		}
	}
}

func TestMaxLogApproachesLogMAP(t *testing.T) {
	// log Σ e^{x_i} − max x_i lies in [0, log n] (common practice, no source), so the two LLRs
	// differ by at most log(M/2); at high SNR the correction vanishes against the LLR size.
	for _, m := range []*modem.Modem{modem.QAM(16), modem.QAM(64), modem.PSK(8), modem.PAM(8)} {
		bound := math.Log(float64(m.M / 2))
		for _, db := range []float64{2, 20} {
			f := received(t, m, 600*m.Bits, db, 5)
			a := detect(t, m.Demod().LogMAP(), f).LLR
			b := detect(t, m.Demod().MaxLog(), f).LLR
			var diff, size float64
			for i := range a {
				d := math.Abs(a[i] - b[i])
				if d > bound+1e-9 {
					t.Fatalf("%s %v dB: |log-MAP − max-log| = %v > log(M/2) = %v", m.Name(), db, d, bound)
				}
				diff += d
				size += math.Abs(a[i])
			}
			if db == 20 && diff/size > 1e-3 {
				t.Errorf("%s at 20 dB: mean |log-MAP − max-log| / mean |LLR| = %v", m.Name(), diff/size)
			}
		}
	}
}

// logPhaseAverage is log (1/2π)∫ exp(2·Re(c·e^{−jφ})/N0) dφ by quadrature: the noncoherent
// likelihood of a hypothesis whose correlation with the observation is c (the phase of the
// signal uniform), up to factors common to all hypotheses.
func logPhaseAverage(c complex128, n0 float64) float64 {
	x := 2 * cmplx.Abs(c) / n0
	v := quad.Fixed(func(p float64) float64 { return math.Exp(x * (math.Cos(p) - 1)) }, 0, 2*math.Pi, 200, nil, 0)
	return x + math.Log(v/(2*math.Pi))
}

func TestNoncoherentLLRsAgainstPhaseAverage(t *testing.T) {
	// DBPSK over a symbol pair: hypotheses (1, 1) and (1, −1); noncoherent BFSK: (1, 0) and
	// (0, 1); DQPSK: (1, j^q), q = 0, 1, 3, 2 for labels 00, 01, 10, 11 (log-sum over the two
	// hypotheses of each bit value).
	for _, db := range []float64{0, 6} {
		m := modem.DBPSK()
		f := received(t, m, 200, db, 3)
		g := detect(t, m.Demod().LogMAP(), f)
		y := g.Samples // made complex by the detector
		for i := range g.LLR {
			a, b := y[i], y[i+1]
			want := logPhaseAverage(a+b, f.N0) - logPhaseAverage(a-b, f.N0)
			if math.Abs(g.LLR[i]-want) > 1e-6*(1+math.Abs(want)) {
				t.Fatalf("DBPSK LLR %v, phase average %v", g.LLR[i], want)
			}
		}
		m = modem.BFSKNoncoherent()
		f = received(t, m, 200, db, 4)
		g = detect(t, m.Demod().LogMAP(), f)
		y = g.Samples
		for i := range g.LLR {
			want := logPhaseAverage(y[2*i], f.N0) - logPhaseAverage(y[2*i+1], f.N0)
			if math.Abs(g.LLR[i]-want) > 1e-6*(1+math.Abs(want)) {
				t.Fatalf("noncoherent BFSK LLR %v, phase average %v", g.LLR[i], want)
			}
		}
		m = modem.DQPSK()
		f = received(t, m, 200, db, 5)
		g = detect(t, m.Demod().LogMAP(), f)
		y = g.Samples
		rot := map[int]complex128{0: 1, 1: 1i, 3: -1, 2: -1i} // label → j^q
		for i := range len(y) - 1 {
			a, b := y[i], y[i+1]
			for j := range 2 {
				var m0, m1 []float64
				for l, u := range rot {
					v := logPhaseAverage(a+b*cmplx.Conj(u), f.N0)
					if l>>(1-j)&1 == 0 {
						m0 = append(m0, v)
					} else {
						m1 = append(m1, v)
					}
				}
				want := floats.LogSumExp(m0) - floats.LogSumExp(m1)
				if got := g.LLR[2*i+j]; math.Abs(got-want) > 1e-6*(1+math.Abs(want)) {
					t.Fatalf("DQPSK LLR %v, phase average %v", got, want)
				}
			}
		}
	}
}

// fade is a test channel stage: it multiplies sample i by a gain drawn from r (amplitude
// from amp, uniform phase) and reports the gains in f.Gain, as a fading channel does.
func fade(amp func(r *rng.Stream) float64) link.Block {
	return link.Func("fade", func(f *link.Frame, r *rng.Stream) {
		f.MakeComplex(r)
		f.Gain = make([]complex128, len(f.Samples))
		for i := range f.Samples {
			g := cmplx.Rect(amp(r), 2*math.Pi*r.Float64())
			f.Gain[i] = g
			f.Samples[i] *= g
		}
	})
}

func TestCSILLRsAgainstFullSearch(t *testing.T) {
	for _, m := range []*modem.Modem{modem.QAM(16), modem.PSK(8), modem.BPSK(), modem.PAM(4), modem.OOK()} {
		k := m.Bits
		f := &link.Frame{SPS: 1, CodeRate: 1, Es: 1}
		for i, b := range []link.Block{sourceRandom(60 * k), m.Mod(), fade(func(r *rng.Stream) float64 { return 0.2 + 2*r.Float64() }), awgn(6)} {
			if err := b.Process(f, rng.New(uint64(40+i))); err != nil {
				t.Fatal(err)
			}
		}
		for _, exact := range []bool{true, false} {
			d := m.Demod().CSI().MaxLog()
			if exact {
				d = m.Demod().CSI().LogMAP()
			}
			g := detect(t, d, f)
			for i, y := range f.Samples {
				want, _ := bruteLLR(m.Points(), k, y, f.Gain[i], f.N0, exact)
				for j := range k {
					if got := g.LLR[i*k+j]; math.Abs(got-want[j]) > 1e-9*(1+math.Abs(want[j])) {
						t.Fatalf("%s CSI (exact %v): LLR %v, full search %v", m.Name(), exact, got, want[j])
					}
				}
			}
		}
	}
}
