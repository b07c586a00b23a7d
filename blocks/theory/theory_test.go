package theory_test

import (
	"math"
	"math/bits"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
	"gonum.org/v1/gonum/stat/distuv"

	"tally/blocks/theory"
)

// close reports whether a and b agree to a relative tolerance.
func close(a, b, rel float64) bool { return math.Abs(a-b) <= rel*math.Max(math.Abs(a), math.Abs(b)) }

func TestQAgainstGonum(t *testing.T) {
	// Reference: gonum's standard normal distribution, Q(x) = Φ(−x) (its Survival, 1 − Φ(x),
	// loses the far tail to rounding) and its quantile.
	n := distuv.UnitNormal
	for _, x := range []float64{-2, 0, 0.5, 1, 3, 5, 8, 20} {
		if got, want := theory.Q(x), n.CDF(-x); !close(got, want, 1e-12) {
			t.Errorf("Q(%v) = %v, gonum Φ(−x) %v", x, got, want)
		}
	}
	for _, p := range []float64{0.4, 1e-3, 1e-6, 1e-12} {
		if got, want := theory.QInv(p), n.Quantile(1-p); !close(got, want, 1e-6) {
			t.Errorf("QInv(%v) = %v, gonum Quantile(1−p) %v", p, got, want)
		}
	}
	if !math.IsNaN(theory.QInv(0)) || !math.IsNaN(theory.QInv(1.5)) {
		t.Error("QInv outside (0, 1) is not NaN")
	}
}

func TestRequiredEbN0(t *testing.T) {
	// Textbook values of the Eb/N0 for BER 1e-5 (from memory: Sklar, Digital Communications,
	// 2nd ed., 2001, ch. 4 and 9, the usual "9.6 dB for BPSK" and its relatives), each to the
	// 0.1 dB the tables give.
	cases := []struct {
		name string
		ber  func(float64) float64
		db   float64
	}{
		{"BPSK", theory.BPSK, 9.6},
		{"QPSK", theory.QPSK, 9.6},
		{"DBPSK", theory.DBPSK, 10.3},
		{"coherent BFSK", theory.BFSK, 12.6},
		{"noncoherent BFSK", theory.BFSKNoncoherent, 13.4},
		{"16-QAM", func(x float64) float64 { return theory.QAM(16, x) }, 13.4},
		{"8-PSK", func(x float64) float64 { return theory.PSK(8, x) }, 13.0},
	}
	for _, c := range cases {
		if got := theory.EbN0For(1e-5, c.ber); math.Abs(got-c.db) > 0.1 {
			t.Errorf("%s: Eb/N0 for BER 1e-5 = %.3f dB, textbook %.1f dB", c.name, got, c.db)
		}
	}
	if !math.IsNaN(theory.EbN0For(0, theory.BPSK)) || !math.IsNaN(theory.EbN0For(0.7, theory.BPSK)) {
		t.Error("EbN0For of an unreachable target is not NaN")
	}
}

func TestBinaryRelations(t *testing.T) {
	// Coherent orthogonal BFSK and OOK (average energy) need exactly 10·log10(2) dB more than
	// BPSK (Proakis, Digital Communications, 4th ed., 2001, ch. 5: Q(√γb) against Q(√(2γb))).
	for _, db := range []float64{0, 5, 10} {
		want := theory.BPSK(db - 10*math.Log10(2))
		if got := theory.BFSK(db); !close(got, want, 1e-12) {
			t.Errorf("BFSK(%v) = %v, BPSK 3 dB lower %v", db, got, want)
		}
		if got := theory.OOK(db); !close(got, want, 1e-12) {
			t.Errorf("OOK(%v) = %v, BPSK 3 dB lower %v", db, got, want)
		}
	}
}

// grayPAMExact is the BER of Gray M-PAM computed from the definition, independently of Cho and
// Yoon's closed form: for each level sent and each decision region, the Gaussian probability
// of the region times the bits in which the labels differ. Levels ±1, ±3, … with noise
// standard deviation sigma.
func grayPAMExact(M int, sigma float64) float64 {
	n := distuv.Normal{Mu: 0, Sigma: sigma}
	k := bits.Len(uint(M)) - 1
	lv := func(i int) float64 { return float64(M - 1 - 2*i) }
	total := 0.0
	for s := range M {
		for r := range M {
			if r == s {
				continue
			}
			hi, lo := math.Inf(1), math.Inf(-1) // region of level r: between midpoints
			if r > 0 {
				hi = lv(r) + 1
			}
			if r < M-1 {
				lo = lv(r) - 1
			}
			a, b := lo-lv(s), hi-lv(s)
			p := n.CDF(b) - n.CDF(a)
			if a > 0 { // upper tail: Φ(−a) − Φ(−b) keeps its precision
				p = n.CDF(-a) - n.CDF(-b)
			}
			total += p * float64(bits.OnesCount(uint((s^s>>1)^(r^r>>1))))
		}
	}
	return total / float64(M*k)
}

func TestPAMAndQAMAgainstDefinition(t *testing.T) {
	for _, M := range []int{2, 4, 8, 16, 32, 64} {
		k := float64(bits.Len(uint(M)) - 1)
		for _, db := range []float64{0, 6, 12, 18} {
			// Levels ±1, ±3: Es = (M²−1)/3, Eb = Es/k, σ² = N0/2.
			es := float64(M*M-1) / 3
			sigma := math.Sqrt(es / k / theory.FromDB(db) / 2)
			want := grayPAMExact(M, sigma)
			if got := theory.PAM(M, db); !close(got, want, 1e-9) {
				t.Errorf("PAM(%d, %v dB) = %v, from the definition %v", M, db, got, want)
			}
		}
	}
	for _, M := range []int{4, 16, 64, 256, 1024} {
		L := int(math.Sqrt(float64(M)))
		k := float64(bits.Len(uint(M)) - 1)
		for _, db := range []float64{0, 6, 12, 18} {
			// Square QAM: each axis an independent L-PAM carrying half the bits; Es per axis
			// (L²−1)/3, Eb = 2·axis energy / k.
			es := 2 * float64(L*L-1) / 3
			sigma := math.Sqrt(es / k / theory.FromDB(db) / 2)
			want := grayPAMExact(L, sigma)
			if got := theory.QAM(M, db); !close(got, want, 1e-9) {
				t.Errorf("QAM(%d, %v dB) = %v, from the definition %v", M, db, got, want)
			}
		}
	}
}

func TestQAMPublishedForms(t *testing.T) {
	// The expanded Gray 16- and 64-QAM expressions (Cho and Yoon, "On the general BER expression
	// of one- and two-dimensional amplitude modulations", IEEE Trans. Commun., 2002; the
	// coefficients from memory), x = √(3·log2(M)·γb/(M−1)):
	//   16-QAM: Pb = ¾Q(x) + ½Q(3x) − ¼Q(5x)
	//   64-QAM: Pb = (7Q(x) + 6Q(3x) − Q(5x) + Q(9x) − Q(13x)) / 12
	Q := theory.Q
	for _, db := range []float64{-2, 0, 4, 8, 12, 16, 20} {
		g := theory.FromDB(db)
		x := math.Sqrt(3 * 4 * g / 15)
		want16 := 0.75*Q(x) + 0.5*Q(3*x) - 0.25*Q(5*x)
		if got := theory.QAM(16, db); !close(got, want16, 1e-12) {
			t.Errorf("QAM(16, %v dB) = %v, published form %v", db, got, want16)
		}
		x = math.Sqrt(3 * 6 * g / 63)
		want64 := (7*Q(x) + 6*Q(3*x) - Q(5*x) + Q(9*x) - Q(13*x)) / 12
		if got := theory.QAM(64, db); !close(got, want64, 1e-12) {
			t.Errorf("QAM(64, %v dB) = %v, published form %v", db, got, want64)
		}
		// 4-QAM is two BPSK axes (Gray QPSK), and 4-QAM SER is 2Q − Q² (Proakis, Digital
		// Communications, 4th ed., 2001, ch. 5).
		if got, want := theory.QAM(4, db), theory.BPSK(db); !close(got, want, 1e-12) {
			t.Errorf("QAM(4, %v dB) = %v, BPSK %v", db, got, want)
		}
		if got, want := theory.QAMSER(4, db), theory.QPSKSER(db); !close(got, want, 1e-12) {
			t.Errorf("QAMSER(4, %v dB) = %v, QPSK 2Q − Q² %v", db, got, want)
		}
		if got, want := theory.PAMSER(2, db), theory.BPSK(db); !close(got, want, 1e-12) {
			t.Errorf("PAMSER(2, %v dB) = %v, BPSK %v", db, got, want)
		}
	}
}

// phasePDF is the density of the phase of √γs + n, n circular Gaussian of unit density:
// p(θ) = e^{−γs}/(2π)·[1 + √(4πγs)·cos θ·e^{γs cos²θ}·(1 − Q(√(2γs) cos θ))] (Proakis, Digital
// Communications, 4th ed., 2001, ch. 5, from memory), written with the exponentials combined.
func phasePDF(gs, th float64) float64 {
	c := math.Cos(th)
	s := math.Sin(th)
	return math.Exp(-gs)/(2*math.Pi) +
		math.Sqrt(4*math.Pi*gs)*c*math.Exp(-gs*s*s)*(1-theory.Q(math.Sqrt(2*gs)*c))/(2*math.Pi)
}

func TestPSKAgainstPhaseDensity(t *testing.T) {
	// Exact Gray M-PSK BER from sector probabilities integrated over the phase density, a route
	// independent of Craig's form.
	for _, M := range []int{8, 16, 32} {
		k := bits.Len(uint(M)) - 1
		for _, db := range []float64{0, 5, 10} {
			gs := theory.FromDB(db) * float64(k)
			pb := 0.0
			for i := range M { // sent position 0, decided position i
				lo := (2*float64(i) - 1) * math.Pi / float64(M)
				p := quad.Fixed(func(th float64) float64 { return phasePDF(gs, th) }, lo, lo+2*math.Pi/float64(M), 64, nil, 0)
				w := 0.0 // Hamming distance of labels i apart, averaged over the start
				for s := range M {
					r := (s + i) % M
					w += float64(bits.OnesCount(uint((s ^ s>>1) ^ (r ^ r>>1))))
				}
				pb += p * w / float64(M)
			}
			pb /= float64(k)
			if got := theory.PSK(M, db); !close(got, pb, 1e-6) {
				t.Errorf("PSK(%d, %v dB) = %v, from the phase density %v", M, db, got, pb)
			}
		}
	}
}

func TestPSKSpecialCasesAndApproximation(t *testing.T) {
	for _, db := range []float64{-2, 0, 4, 8, 12} {
		g := theory.FromDB(db)
		// M = 2 and 4 are BPSK and Gray QPSK: Pb = Q(√(2γb)); QPSK SER 2Q(√γs) − Q(√γs)²
		// (Proakis, Digital Communications, 4th ed., 2001, ch. 5).
		if got, want := theory.PSK(4, db), theory.Q(math.Sqrt(2*g)); !close(got, want, 1e-9) {
			t.Errorf("PSK(4, %v dB) = %v, Q(√(2γb)) %v", db, got, want)
		}
		if got, want := theory.PSKSER(4, db), theory.QPSKSER(db); !close(got, want, 1e-9) {
			t.Errorf("PSKSER(4, %v dB) = %v, 2Q − Q² %v", db, got, want)
		}
		if got, want := theory.PSKSER(2, db), theory.Q(math.Sqrt(2*g)); !close(got, want, 1e-9) {
			t.Errorf("PSKSER(2, %v dB) = %v, Q(√(2γb)) %v", db, got, want)
		}
	}
	// At high SNR the exact SER approaches the two-neighbour approximation 2Q(√(2γs) sin(π/M))
	// from below and the BER approaches SER/log2(M) (Gray: neighbours differ in one bit)
	// (Proakis, Digital Communications, 4th ed., 2001, ch. 5).
	for _, M := range []int{8, 16, 32, 64} {
		db := theory.EbN0For(1e-9, func(x float64) float64 { return theory.PSKSERApprox(M, x) })
		ser, apx := theory.PSKSER(M, db), theory.PSKSERApprox(M, db)
		if !(ser <= apx) || !close(ser, apx, 1e-3) {
			t.Errorf("M = %d at %.2f dB: exact SER %v, approximation %v", M, db, ser, apx)
		}
		if ber, apx := theory.PSK(M, db), theory.PSKApprox(M, db); !close(ber, apx, 1e-2) {
			t.Errorf("M = %d at %.2f dB: exact BER %v, Gray approximation %v", M, db, ber, apx)
		}
	}
}

// marcumQ1 is Marcum's Q function from its definition, Q1(a, b) = ∫_b^∞ x·e^{−(x²+a²)/2}·I0(ax) dx
// (Proakis, Digital Communications, 4th ed., 2001, ch. 2), with I0(z) = (1/π)∫_0^π e^{z cos t} dt
// (Abramowitz and Stegun, 1964, eq. 9.6.16), both by quadrature and written with e^{−ax} taken
// into I0 to avoid overflow.
func marcumQ1(a, b float64) float64 {
	i0e := func(z float64) float64 { // e^{−z}·I0(z)
		return quad.Fixed(func(t float64) float64 { return math.Exp(z * (math.Cos(t) - 1)) }, 0, math.Pi, 64, nil, 0) / math.Pi
	}
	f := func(x float64) float64 { return x * math.Exp(-(x-a)*(x-a)/2) * i0e(a*x) }
	return quad.Fixed(f, b, b+40, 400, nil, 0)
}

func TestDQPSKAgainstMarcum(t *testing.T) {
	// Pb = Q1(a, b) − ½·I0(ab)·e^{−(a²+b²)/2}, a, b = √(2γb(1 ∓ 1/√2)) (Proakis, Digital
	// Communications, 4th ed., 2001, ch. 5), from the definitions of Q1 and I0.
	for _, db := range []float64{0, 4, 8, 12} {
		g := theory.FromDB(db)
		a := math.Sqrt(2 * g * (1 - 1/math.Sqrt2))
		b := math.Sqrt(2 * g * (1 + 1/math.Sqrt2))
		i0 := quad.Fixed(func(t float64) float64 { return math.Exp(a * b * (math.Cos(t) - 1)) }, 0, math.Pi, 64, nil, 0) / math.Pi
		want := marcumQ1(a, b) - 0.5*i0*math.Exp(-(a-b)*(a-b)/2)
		if got := theory.DQPSK(db); !close(got, want, 1e-6) {
			t.Errorf("DQPSK(%v dB) = %v, from Marcum's Q %v", db, got, want)
		}
	}
	// DQPSK costs about 2.3 dB against coherent QPSK at BER 1e-5 (Proakis, Digital
	// Communications, 4th ed., 2001, ch. 5; from memory).
	gap := theory.EbN0For(1e-5, theory.DQPSK) - theory.EbN0For(1e-5, theory.QPSK)
	if math.Abs(gap-2.3) > 0.15 {
		t.Errorf("DQPSK − QPSK at 1e-5 = %.2f dB, textbook about 2.3 dB", gap)
	}
}

func TestBadParametersGiveNaN(t *testing.T) {
	for _, v := range []float64{
		theory.PSK(12, 5), theory.PSK(1, 5), theory.PSKSER(3, 5), theory.PSKApprox(0, 5),
		theory.QAM(32, 5), theory.QAM(12, 5), theory.QAMSER(8, 5),
		theory.PAM(6, 5), theory.PAMSER(0, 5),
		theory.BPSK(math.NaN()), theory.QAM(16, math.NaN()), theory.PSK(8, math.NaN()), theory.DQPSK(math.NaN()),
	} {
		if !math.IsNaN(v) {
			t.Errorf("got %v, want NaN", v)
		}
	}
}

func TestMonotone(t *testing.T) {
	// Every BER falls with Eb/N0 and lies in [0, ½] (common practice, no source).
	curves := map[string]func(float64) float64{
		"BPSK": theory.BPSK, "OOK": theory.OOK, "DBPSK": theory.DBPSK, "DQPSK": theory.DQPSK,
		"BFSK-NC": theory.BFSKNoncoherent,
		"8-PSK":   func(x float64) float64 { return theory.PSK(8, x) },
		"64-PSK":  func(x float64) float64 { return theory.PSK(64, x) },
		"256-QAM": func(x float64) float64 { return theory.QAM(256, x) },
		"8-PAM":   func(x float64) float64 { return theory.PAM(8, x) },
	}
	for name, f := range curves {
		prev := 0.5 + 1e-9
		for db := -10.0; db <= 30; db += 0.5 {
			v := f(db)
			if !(v >= 0 && v <= prev) {
				t.Errorf("%s(%v dB) = %v after %v", name, db, v, prev)
				break
			}
			prev = v
		}
	}
}
