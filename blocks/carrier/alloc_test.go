package carrier

import (
	"testing"

	"tally/blocks/internal/linktest"
	"tally/blocks/link"
	"tally/blocks/rng"
)

// Blocks reuse their buffers: no allocation per frame once running (the link contract).
func TestNoAllocation(t *testing.T) {
	for _, c := range []struct {
		b    link.Block
		bits int
	}{{MPower(16), 1}, {MPower(16).Weight(2), 1}, {BlindPhase(16, 16), 2}, {BlindPhase(16, 16).Symmetric(4), 3}} {
		m := linktest.NewModem(c.bits, c.bits)
		f := &link.Frame{}
		r := rng.New(1)
		_ = (&linktest.Source{N: 512 * c.bits}).Process(f, r)
		_ = m.Process(f, r)
		_ = c.b.Process(f, r)
		if a := testing.AllocsPerRun(20, func() { _ = c.b.Process(f, r) }); a != 0 {
			t.Errorf("%s: %v allocations per frame", link.NameOf(c.b), a)
		}
	}
}
