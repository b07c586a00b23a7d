package theory_test

import (
	"math"
	"testing"

	"tally/blocks/theory"
)

func fadingAWGNBPSK(g float64) float64 { return 0.5 * math.Erfc(math.Sqrt(g)) } // Q(√(2γ))

// BPSK in Rayleigh fading at 10 dB: 0.0233 (Proakis, Digital Communications, 4th ed., 2001,
// eq. 14.3-7 evaluated, and his Fig. 14.3-1), and the high-SNR limit Pb → 1/(4γ̄b) (ibid.,
// eq. 14.3-8).
func TestBPSKRayleigh(t *testing.T) {
	if got := theory.BPSKRayleigh(10); math.Abs(got-0.0233) > 0.00005 {
		t.Errorf("BPSKRayleigh(10 dB) = %.5f, want 0.0233", got)
	}
	g := 1e4
	if got := theory.BPSKRayleigh(40); math.Abs(got*4*g-1) > 1e-3 {
		t.Errorf("BPSKRayleigh(40 dB)·4γ̄ = %.5f, want → 1", got*4*g)
	}
}

// The Rician MGF integral must reduce to Rayleigh's closed form at K = 0 and approach the AWGN
// error rate Q(√(2γb)) (math.Erfc) as K → ∞ (Simon and Alouini, Digital Communication over
// Fading Channels, 2nd ed., 2005, ch. 2: K = 0 is Rayleigh, K → ∞ no fading).
func TestBPSKRicianLimits(t *testing.T) {
	for _, db := range []float64{0, 5, 10, 20, 30} {
		if got, want := theory.BPSKRician(0, db), theory.BPSKRayleigh(db); math.Abs(got/want-1) > 1e-9 {
			t.Errorf("K = 0, %v dB: %.10g, Rayleigh closed form %.10g", db, got, want)
		}
	}
	for _, db := range []float64{0, 4, 8} {
		want := fadingAWGNBPSK(math.Pow(10, db/10))
		if got := theory.BPSKRician(1e6, db); math.Abs(got/want-1) > 1e-3 {
			t.Errorf("K = 1e6, %v dB: %.6g, AWGN %.6g", db, got, want)
		}
	}
	// Between the limits the error rate falls as K grows (more of the power is steady).
	prev := 1.0
	for _, k := range []float64{0, 0.5, 1, 2, 4, 8, 16} {
		p := theory.BPSKRician(k, 10)
		if !(p < prev) || p < fadingAWGNBPSK(10) {
			t.Errorf("K = %v: Pb = %.4g not between the previous %.4g and AWGN", k, p, prev)
		}
		prev = p
	}
}

// Closed form of the M-PSK symbol error rate in Rayleigh fading (Simon and Alouini, 2005,
// eq. 8.112, from memory): with g = sin²(π/M) and c = gγ̄s,
// Ps = (M−1)/M·[1 − √(c/(1+c))·M/((M−1)π)·(π/2 + atan(√(c/(1+c))·cot(π/M)))].
func TestPSKSERRayleighClosedForm(t *testing.T) {
	for _, M := range []int{2, 4, 8, 16} {
		for _, db := range []float64{0, 10, 25} {
			m := float64(M)
			s := math.Sin(math.Pi / m)
			c := s * s * math.Pow(10, db/10) * math.Log2(m)
			r := math.Sqrt(c / (1 + c))
			want := (m - 1) / m * (1 - r*m/((m-1)*math.Pi)*(math.Pi/2+math.Atan(r/math.Tan(math.Pi/m))))
			if got := theory.PSKSERRayleigh(M, db); math.Abs(got/want-1) > 1e-8 {
				t.Errorf("M = %d, %v dB: %.10g, closed form %.10g", M, db, got, want)
			}
		}
	}
}

// Square-QAM symbol error rate in Rayleigh fading, closed form (Simon and Alouini, 2005,
// eq. 8.108, from memory): with q = 1 − 1/√M, c = 3γ̄s/(2(M−1)), r = √(c/(1+c)),
// Ps = 2q(1 − r) − q²(1 − (4/π)·r·atan(1/r)). 4-QAM must equal 4-PSK (the same constellation).
func TestQAMSERRayleigh(t *testing.T) {
	for _, M := range []int{4, 16, 64, 256} {
		for _, db := range []float64{0, 10, 30} {
			m := float64(M)
			q := 1 - 1/math.Sqrt(m)
			c := 3 * math.Pow(10, db/10) * math.Log2(m) / (2 * (m - 1))
			r := math.Sqrt(c / (1 + c))
			want := 2*q*(1-r) - q*q*(1-4/math.Pi*r*math.Atan(1/r))
			if got := theory.QAMSERRayleigh(M, db); math.Abs(got/want-1) > 1e-8 {
				t.Errorf("M = %d, %v dB: %.10g, closed form %.10g", M, db, got, want)
			}
		}
	}
	for _, db := range []float64{0, 7, 15} {
		a, b := theory.QAMSERRayleigh(4, db), theory.PSKSERRayleigh(4, db)
		if math.Abs(a/b-1) > 1e-9 {
			t.Errorf("%v dB: 4-QAM %.10g ≠ QPSK %.10g", db, a, b)
		}
	}
}

// As K → ∞ the Rician QAM and PSK symbol error rates approach AWGN: for square M-QAM
// Ps = 1 − (1 − p)², p = 2(1 − 1/√M)·Q(√(3γs/(M−1))) (Proakis, 2001, ch. 5).
func TestSERRicianAWGNLimit(t *testing.T) {
	for _, M := range []int{4, 16, 64} {
		db := 12.0
		m := float64(M)
		gs := math.Pow(10, db/10) * math.Log2(m)
		p := (1 - 1/math.Sqrt(m)) * math.Erfc(math.Sqrt(3*gs/(2*(m-1))))
		want := 1 - (1-p)*(1-p)
		if got := theory.QAMSERRician(M, 1e6, db); math.Abs(got/want-1) > 2e-3 {
			t.Errorf("M = %d: %.6g, AWGN %.6g", M, got, want)
		}
	}
	if got, want := theory.PSKSERRician(2, 1e6, 6), fadingAWGNBPSK(math.Pow(10, 0.6)); math.Abs(got/want-1) > 1e-3 {
		t.Errorf("2-PSK: %.6g, AWGN %.6g", got, want)
	}
}

func TestFadingBadArguments(t *testing.T) {
	for _, v := range []float64{
		theory.BPSKRician(-1, 5), theory.BPSKRician(math.NaN(), 5), theory.PSKSERRician(6, 1, 5),
		theory.QAMSERRician(8, 1, 5), theory.QAMSERRayleigh(16, math.NaN()),
	} {
		if !math.IsNaN(v) {
			t.Errorf("got %v, want NaN", v)
		}
	}
}
