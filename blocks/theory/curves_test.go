package theory

import (
	"fmt"
	"math"
	"testing"
)

// The curve helpers are their formulas with the order, code or factor fixed, checked against
// closed forms the formulas must reduce to:
//   - Gray QPSK (PSK(4), QAM(4)) and 2-PAM have BPSK's bit error rate Q(√(2γb)) (Proakis,
//     Digital Communications, 4th ed., 2001, eqs. 5.2-5 and 5.2-58; from memory), computed
//     here from math.Erfc;
//   - Rician fading with K = 0 is Rayleigh fading, ½·(1 − √(γ̄/(1+γ̄))) (ibid., eq. 14.3-7);
//   - a helper gives at every Eb/N0 exactly the value of the formula it fixes.
func TestCurveHelpers(t *testing.T) {
	q := func(db float64) float64 { return 0.5 * math.Erfc(math.Sqrt(math.Pow(10, db/10))) }
	ray := func(db float64) float64 { g := math.Pow(10, db/10); return 0.5 * (1 - math.Sqrt(g/(1+g))) }
	for _, db := range []float64{0, 3, 6, 9.6, 12} {
		for name, c := range map[string]struct{ got, want float64 }{
			"PSKCurve(4)":    {PSKCurve(4)(db), q(db)},
			"QAMCurve(4)":    {QAMCurve(4)(db), q(db)},
			"PAMCurve(2)":    {PAMCurve(2)(db), q(db)},
			"RicianCurve(0)": {RicianCurve(0)(db), ray(db)},
		} {
			if math.Abs(c.got-c.want) > 1e-9*c.want {
				t.Errorf("%s at %g dB = %g, want %g", name, db, c.got, c.want)
			}
		}
		for name, c := range map[string]struct{ got, want float64 }{
			"PSKCurve(8)":             {PSKCurve(8)(db), PSK(8, db)},
			"QAMCurve(64)":            {QAMCurve(64)(db), QAM(64, db)},
			"PAMCurve(4)":             {PAMCurve(4)(db), PAM(4, db)},
			"RicianCurve(5)":          {RicianCurve(5)(db), BPSKRician(5, db)},
			"RSCurve(204, 188)":       {RSCurve(204, 188)(db), RS(204, 188, db)},
			"NormalApproxCurve(1024)": {NormalApproxCurve(1024, 512)(db), NormalApprox(1024, 512, db)},
		} {
			if c.got != c.want {
				t.Errorf("%s at %g dB = %g, want the formula's %g", name, db, c.got, c.want)
			}
		}
	}
}

// The printed values are the formulas the helpers wrap: Gray 16-QAM and 4-PAM at 10 dB,
// (3/8)·erfc(√(0.4·Eb/N0)) = (3/8)·erfc(2) = 1.754e-3 (Proakis, Digital Communications, 4th ed.,
// 2001, eq. 5.2-79 with the Gray nearest-neighbour approximation, from memory), and exact Gray
// 8-PSK (Lassing, Ström, Agrell and Ottosson, IEEE Trans. Commun., 2003).
func ExampleQAMCurve() {
	qam16 := QAMCurve(16) // a func(float64) float64 of Eb/N0, for x.Curve(…).Theory(qam16)
	fmt.Printf("16-QAM at 10 dB: BER %.2e\n", qam16(10))
	// Output: 16-QAM at 10 dB: BER 1.75e-03
}

func ExamplePSKCurve() {
	fmt.Printf("8-PSK at 10 dB: BER %.2e\n", PSKCurve(8)(10))
	// Output: 8-PSK at 10 dB: BER 1.01e-03
}

func ExamplePAMCurve() {
	fmt.Printf("4-PAM at 10 dB: BER %.2e\n", PAMCurve(4)(10))
	// Output: 4-PAM at 10 dB: BER 1.75e-03
}

func ExampleRicianCurve() {
	fmt.Printf("BPSK, Rician K = 0, at 10 dB: BER %.4f\n", RicianCurve(0)(10))
	// Output: BPSK, Rician K = 0, at 10 dB: BER 0.0233
}

func ExampleRSCurve() {
	fmt.Printf("RS(204,188) at 6 dB: BER %.1e\n", RSCurve(204, 188)(6))
	// Output: RS(204,188) at 6 dB: BER 6.0e-04
}

func ExampleNormalApproxCurve() {
	fmt.Printf("(1024, 512) at 2 dB: FER %.1e\n", NormalApproxCurve(1024, 512)(2))
	// Output: (1024, 512) at 2 dB: FER 7.6e-10
}
