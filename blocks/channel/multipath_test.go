package channel_test

import (
	"math"
	"math/cmplx"
	"strings"
	"testing"

	"tally/blocks/channel"
	"tally/blocks/link"
	"tally/blocks/rng"
)

// The impulse response of the channel is its taps, scaled to unit energy by default, with the
// strongest tap on time.
func TestMultipathImpulse(t *testing.T) {
	taps := []complex128{0.5i, 1, -0.25}
	e := math.Sqrt(1 + 0.25 + 0.0625)
	for _, c := range []*channel.FIR{channel.Multipath(taps), channel.Multipath(taps).AsGiven()} {
		f := link.Frame{SPS: 1, Symbols: 6, Samples: []complex128{0, 0, 1, 0, 0, 0}}
		if err := c.Process(&f, rng.New(1)); err != nil {
			t.Fatal(err)
		}
		s := 1.0
		if c.Scaled {
			s = e
		}
		want := []complex128{0, taps[0], taps[1], taps[2], 0, 0}
		for i, w := range want {
			if cmplx.Abs(f.Samples[i]-w/complex(s, 0)) > 1e-15 {
				t.Errorf("scaled %v: y[%d] = %v, want %v", c.Scaled, i, f.Samples[i], w/complex(s, 0))
			}
		}
	}
}

func TestMultipathErrors(t *testing.T) {
	if err := channel.Multipath([]complex128{0, 0}).Err(); err == nil || !strings.Contains(err.Error(), "no energy") {
		t.Errorf("got %v", err)
	}
	if err := channel.Multipath([]complex128{1, cmplx.NaN()}).Err(); err == nil || !strings.Contains(err.Error(), "tap 1") {
		t.Errorf("got %v", err)
	}
}
