package watch

import (
	"strings"
	"testing"

	"tally/blocks/compare"
	"tally/blocks/stats"
	"tally/runtime/result"
)

func counts(seed uint64, ks ...int64) *result.Run {
	r := &result.Run{Params: []string{"ebn0_db"}, Taps: []string{"ber", "fer"}, Confidence: 0.95, Seed: seed}
	for i, k := range ks {
		r.Points = append(r.Points, result.Point{Values: []float64{float64(2 * i)},
			Taps: []result.Tap{{Name: "ber", Trials: 1e6, Errors: k, Rate: float64(k) / 1e6}, {Name: "fer", Trials: 100}}})
	}
	return r
}

func TestChangesSameCounts(t *testing.T) {
	got := Changes(counts(1, 100, 20), counts(1, 100, 20))
	if len(got) != 1 || got[0] != "all 2 points: same counts" {
		t.Errorf("Changes = %q", got)
	}
}

// A tripled BER is flagged, a 4 % move is not; the p printed is Fisher's, Holm-adjusted over
// the two points compared.
func TestChangesFlagsRealMoves(t *testing.T) {
	got := strings.Join(Changes(counts(1, 100, 100), counts(2, 300, 104)), "\n")
	a, _ := compare.Proportions(100, 1e6, 300, 1e6)
	b, _ := compare.Proportions(100, 1e6, 104, 1e6)
	adj := compare.Holm([]float64{a.P, b.P})
	for _, want := range []string{
		"ebn0_db=0  ber 0.0001 → 0.0003 (×3)  CHANGED, " + stats.FormatP(adj[0]) + " (Fisher on totals)",
		"ebn0_db=2  ber 0.0001 → 0.000104 (×1.04)  within chance, " + stats.FormatP(adj[1]),
		"Holm-adjusted over 2 points",
	} {
		if !strings.Contains(got, want) {
			t.Errorf("Changes lacks %q:\n%s", want, got)
		}
	}
}

func TestChangesPointsAndTargets(t *testing.T) {
	prev, next := counts(1, 100, 20), counts(1, 100, 20, 3)
	prev.Points = append(prev.Points, result.Point{Values: []float64{9}, Taps: []result.Tap{{Name: "ber", Trials: 10, Errors: 1}}})
	prev.Targets = []result.Target{{Tap: "ber", Rate: 1e-5, Found: true, X: 6.8, Low: 6.7, High: 6.9}}
	next.Targets = []result.Target{{Tap: "ber", Rate: 1e-5, Found: true, X: 7.1, Low: 7.0, High: 7.2}}
	got := strings.Join(Changes(prev, next), "\n")
	for _, want := range []string{"ebn0_db=4  ber 3e-06  (new point)", "ebn0_db=9  (no longer swept)",
		"ber = 1e-05 at ebn0_db: 6.80 → 7.10 (+0.30 dB), beyond both intervals"} {
		if !strings.Contains(got, want) {
			t.Errorf("Changes lacks %q:\n%s", want, got)
		}
	}
}

// A shift that rounds to zero reads 0.00, never −0.00 or +0.00.
func TestSignedShift(t *testing.T) {
	for _, c := range []struct {
		d    float64
		want string
	}{{-0.001, "0.00"}, {0.004, "0.00"}, {0, "0.00"}, {-0.006, "−0.01"}, {0.25, "+0.25"}, {-1.5, "−1.50"}} {
		if got := signed(c.d); got != c.want {
			t.Errorf("signed(%v) = %q, want %q", c.d, got, c.want)
		}
	}
}

// Errors shown to come in bursts are compared on their effective counts (Rao and Scott,
// JASA 76, 1981: counts divided by the design effect, here the observed dispersion). 1000
// against 1200 errors in 10⁶ bits is a real move for independent bits (p ≈ 1e-5), but not
// when bursts of about 20 make them 50 against 60 independent events.
func TestChangesBurstyOnEffectiveCounts(t *testing.T) {
	bursty := func(k int64) *result.Run {
		r := counts(1, k)
		tp := &r.Points[0].Taps[0]
		tp.Dispersion, tp.Method = 20, "clopper-pearson+clustered"
		return r
	}
	raw, _ := compare.Proportions(1000, 1e6, 1200, 1e6)
	if raw.P > 1e-3 {
		t.Fatalf("raw p %.2g: the case no longer shows anything", raw.P)
	}
	eff, _ := compare.Proportions(50, 50000, 60, 50000)
	got := strings.Join(Changes(bursty(1000), bursty(1200)), "\n")
	if want := "within chance, " + stats.FormatP(eff.P); !strings.Contains(got, want) {
		t.Errorf("got\n%s\nwant %q", got, want)
	}
	// The same counts, not shown bursty, are a change.
	if got := strings.Join(Changes(counts(1, 1000), counts(1, 1200)), "\n"); !strings.Contains(got, "CHANGED") {
		t.Errorf("independent counts not flagged:\n%s", got)
	}
}
