package impair

import (
	"testing"

	"tally/blocks/link"
	"tally/blocks/rng"
)

// Blocks reuse their buffers: no allocation per frame once running (the link contract).
func TestNoAllocation(t *testing.T) {
	for _, b := range []link.Block{Phase(3), Frequency(1e-3), PhaseNoise(1e-4).RandomStart(), IQ(0.5, 2), DC(0.1, 0.1), Rapp(3, 2), Saleh(3), Cubic(3).FixedGain(), ADC(6), ADC(6).FullScale(2)} {
		f := &link.Frame{SPS: 1, Es: 1, Samples: make([]complex128, 256)}
		r := rng.New(1)
		r.AddNoise(f.Samples, 1)
		_ = b.Process(f, r)
		if a := testing.AllocsPerRun(20, func() { _ = b.Process(f, r) }); a != 0 {
			t.Errorf("%s: %v allocations per frame", link.NameOf(b), a)
		}
	}
}
