package watch

import (
	"math/rand/v2"
	"strings"
	"testing"

	"tally/blocks/compare"
	"tally/blocks/link"
	"tally/blocks/stats"
	"tally/runtime/framelog"
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

// logged is a one-point run whose BER tap counted errs[f] errors in frame f of 1000 bits, with
// its per-frame counts kept, under a link fingerprint.
func logged(print string, errs []int64) *result.Run {
	l := framelog.New(2)
	var k int64
	for _, e := range errs {
		fe := int64(0)
		if e > 0 {
			fe = 1
		}
		l.Add([]link.Tally{{Trials: 1000, Errors: e}, {Trials: 1, Errors: fe}})
		k += e
	}
	n := int64(len(errs))
	r := &result.Run{Params: []string{"ebn0_db"}, Taps: []string{"ber", "fer"}, Confidence: 0.95, Seed: 1}
	r.Points = []result.Point{{Values: []float64{4}, Frames: n, LinkFingerprint: print, RulesFingerprint: "rules", Log: l,
		Taps: []result.Tap{{Name: "ber", Trials: 1000 * n, Errors: k, Rate: float64(k) / float64(1000*n)}, {Name: "fer", Trials: n}}}}
	return r
}

// A changed link is tested frame by frame on the frames both runs counted. B makes one more
// error than A in one frame of twenty, the rest of its errors the same: paired, that is
// shown beyond doubt; on the totals (Fisher's exact test, as before) 2000 against 2100 errors
// in 2·10⁶ bits is not shown at α = 0.05 after no adjustment at all. The gain of pairing
// (common random numbers; common practice, no source).
func TestChangesPairedFindsWhatTotalsMiss(t *testing.T) {
	r := rand.New(rand.NewPCG(7, 8))
	a, b := make([]int64, 2000), make([]int64, 2000)
	var ka, kb int64
	for f := range a {
		a[f] = int64(r.IntN(3)) // mean 1
		b[f] = a[f]
		if f%20 == 0 {
			b[f]++
		}
		ka, kb = ka+a[f], kb+b[f]
	}
	got := strings.Join(Changes(logged("A", a), logged("B", b)), "\n")
	if !strings.Contains(got, "CHANGED") || !strings.Contains(got, "(paired, 2000 frames)") {
		t.Errorf("a paired change not shown:\n%s", got)
	}
	fisher, _ := compare.Proportions(ka, 2e6, kb, 2e6)
	if fisher.P < 0.05 {
		t.Errorf("Fisher's p %.3g on the totals: the case does not show what pairing adds", fisher.P)
	}
	// Over the first 1000 frames only (the new run stopped there), the frames compared are
	// those both runs counted.
	if got := strings.Join(Changes(logged("A", a), logged("B", b[:1000])), "\n"); !strings.Contains(got, "(paired, 1000 frames)") {
		t.Errorf("not compared over the common frames:\n%s", got)
	}
	// Ten frames in common are too few to judge (stats.MinPairedFrames): said, not tested.
	got = strings.Join(Changes(logged("A", a[:10]), logged("B", b[:10])), "\n")
	if !strings.Contains(got, "not judged: 10 frames in common, the paired test needs 30") || strings.Contains(got, "p:") {
		t.Errorf("ten frames judged:\n%s", got)
	}
}

// The case in counts: the same link (fingerprint) with a changed stop rule counted
// three times the frames of a bursty link. Its totals moved (Fisher on them gave p = 2.3e-58
// before); the frames are the same by construction, so there is nothing to test.
func TestChangesSameLinkNotTested(t *testing.T) {
	errs := make([]int64, 3000)
	for f := range errs {
		if f%50 == 0 {
			errs[f] = 40 // bursts
		}
	}
	prev, next := logged("L", errs[:1000]), logged("L", errs)
	next.Points[0].RulesFingerprint = "other rules"
	next.Points[0].FramesReused = 1000
	got := Changes(prev, next)
	want := []string{
		"1 point: same link and seed, so the same frames (not tested); 1 point with new stop rules",
		"ran on from the last run's frames (replayed, then computed as the new rules asked): 1 point",
	}
	if strings.Join(got, "\n") != strings.Join(want, "\n") {
		t.Errorf("Changes =\n%s\nwant\n%s", strings.Join(got, "\n"), strings.Join(want, "\n"))
	}
}

// α prints as the level it is (0.05, 0.01), not as 1 − 0.95 in floating point.
func TestChangesAlphaPrinted(t *testing.T) {
	for conf, want := range map[float64]string{0.95: "α = 0.05,", 0.99: "α = 0.01,", 0.9: "α = 0.1,"} {
		prev, next := counts(1, 100, 100), counts(2, 300, 104)
		next.Confidence = conf
		if got := strings.Join(Changes(prev, next), "\n"); !strings.Contains(got, want) {
			t.Errorf("confidence %g: no %q in\n%s", conf, want, got)
		}
	}
}
