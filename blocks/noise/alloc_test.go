package noise

import (
	"testing"

	"tally/blocks/link"
	"tally/blocks/rng"
)

// Blocks reuse their buffers: no allocation per frame once running (the link contract).
func TestNoAllocation(t *testing.T) {
	for _, b := range []link.Block{ClassA(5, 0.1, 0.1), BernoulliGaussian(5, 0.01, 100), Laplacian(5)} {
		f := zeroFrame(256)
		r := rng.New(1)
		_ = b.Process(f, r)
		if a := testing.AllocsPerRun(20, func() { _ = b.Process(f, r) }); a != 0 {
			t.Errorf("%s: %v allocations per frame", link.NameOf(b), a)
		}
	}
}
