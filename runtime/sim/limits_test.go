package sim

import (
	"math"
	"strings"
	"tally/runtime/internal/runner"
	"testing"

	"tally/blocks/stop"
	"tally/runtime/output"
)

// A limit curve flags points whose interval lies wholly below it, and only those. The uncoded
// BPSK link of progressLink has BER Q(√(2 Eb/N0)) (Proakis, Digital Communications, 2001,
// eq. 5.2-5); a "limit" 10 times that is beaten beyond any interval, one 10 times smaller is not.
func TestLimitFlagsPointsBelow(t *testing.T) {
	q := func(db float64) float64 { return 0.5 * math.Erfc(math.Sqrt(math.Pow(10, db/10))) }
	for _, c := range []struct {
		factor float64
		flag   bool
	}{{10, true}, {0.1, false}} {
		x := testExperiment("limits", &runner.Options{Quiet: true, Workers: 1})
		x.Sweep("ebn0_db", 0, 2)
		x.Link(progressLink)
		x.Stop(stop.Bits(200 * 512))
		x.Limit("ber", "bound", func(p Point) float64 { return c.factor * q(p.Get("ebn0_db")) })
		r, err := x.execute()
		if err != nil {
			t.Fatal(err)
		}
		if len(r.Limits) != 1 || r.Limits[0].Curve != "bound" || len(r.Theory) != 1 {
			t.Fatalf("limits %+v, theory %v", r.Limits, r.Theory)
		}
		got := len(r.Notes) > 0 && strings.Contains(r.Notes[0], "Likely error in the link") &&
			strings.Contains(r.Notes[0], "ebn0_db 0") && strings.Contains(r.Notes[0], "ebn0_db 2")
		if got != c.flag {
			t.Errorf("limit ×%g: notes %q", c.factor, r.Notes)
		}
		sum := string(output.Summary(r, nil))
		if strings.Contains(sum, "## Notes") != c.flag {
			t.Errorf("limit ×%g: summary notes section present = %v", c.factor, !c.flag)
		}
	}
}
