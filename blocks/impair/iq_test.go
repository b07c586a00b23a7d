package impair

import (
	"math"
	"math/cmplx"
	"testing"

	"tally/blocks/rng"
)

// A tone through the imbalanced converter comes out as the tone plus its image; their power
// ratio is the image rejection ratio
//
//	IRR = (1 + 2g·cos φ + g²) / (1 − 2g·cos φ + g²)
//
// (Razavi, RF Microelectronics, 2nd ed., 2012, ch. 4, image rejection with gain and phase
// mismatch; from memory).
func TestIQImageRejection(t *testing.T) {
	const n = 1000
	w := 2 * math.Pi * 37 / n // a whole number of cycles: tone and image are orthogonal
	for _, c := range []struct{ gdb, deg float64 }{{0.5, 2}, {-1, 5}, {0.2, -3}} {
		f := ones(n, 1)
		for i := range f.Samples {
			f.Samples[i] = cmplx.Exp(complex(0, w*float64(i)))
		}
		b := IQ(c.gdb, c.deg)
		if err := b.Process(f, rng.New(1)); err != nil {
			t.Fatal(err)
		}
		var tone, image complex128
		for i, y := range f.Samples {
			tone += y * cmplx.Exp(complex(0, -w*float64(i)))
			image += y * cmplx.Exp(complex(0, w*float64(i)))
		}
		got := 10 * math.Log10(real(tone*cmplx.Conj(tone))/real(image*cmplx.Conj(image)))
		g, cp := math.Pow(10, c.gdb/20), math.Cos(c.deg*math.Pi/180)
		want := 10 * math.Log10((1+2*g*cp+g*g)/(1-2*g*cp+g*g))
		if math.Abs(got-want) > 1e-6 || math.Abs(b.ImageRejection()-want) > 1e-9 {
			t.Errorf("IQ(%v dB, %v°): IRR %.6f dB measured, %.6f reported, want %.6f", c.gdb, c.deg, got, b.ImageRejection(), want)
		}
	}
}

// A DC offset is relative to the nominal RMS sample amplitude √(Es/SPS).
func TestDCRelative(t *testing.T) {
	f := ones(4, 4)
	f.Samples[0] = 0
	if err := DC(0.5, -0.25).Process(f, rng.New(1)); err != nil {
		t.Fatal(err)
	}
	if want := complex(0.25, -0.125); cmplx.Abs(f.Samples[0]-want) > 1e-15 {
		t.Errorf("DC(0.5, -0.25) at SPS 4 added %v, want %v", f.Samples[0], want)
	}
}
