package bench

import (
	"bytes"
	"math"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"tally/blocks/stats"
)

// The custom-block case counts real errors: both ways of writing the combiner agree with the
// closed form of two-branch maximum-ratio combining (Proakis, Digital Communications, 4th ed.,
// 2001, eq. 14.4-15, L = 2), written here again from the source. BPSK over per-symbol
// independent fading makes every bit an independent trial, so the binomial interval holds.
func TestCombinerAgreesWithTheory(t *testing.T) {
	m := regexp.MustCompile(`(?m)^const ebn0 = ([0-9.]+) `).FindSubmatch(CombinerScript)
	if m == nil {
		t.Fatal("the script has no ebn0 line")
	}
	if db, _ := strconv.ParseFloat(string(m[1]), 64); db != CombinerEbN0 {
		t.Fatalf("the script runs at %v dB, CombinerEbN0 says %v", db, CombinerEbN0)
	}
	g := math.Pow(10, CombinerEbN0/10)
	mu := math.Sqrt(g / (1 + g))
	p := (1 - mu) / 2
	want := p * p * (1 + 2*(1-p)) // Σ_{k=0}^{1} C(1+k, k)·((1+μ)/2)^k = 1 + 2(1+μ)/2
	if got := CombinerBER(CombinerEbN0); math.Abs(got-want) > 1e-12*want {
		t.Fatalf("CombinerBER = %g, closed form %g", got, want)
	}
	rs, err := CombinerRun(t.Context(), 12*FrameBits, 2)
	if err != nil {
		t.Fatal(err)
	}
	for i, r := range rs {
		if r.Case != CombinerCases[i] || r.Bits < 12*FrameBits {
			t.Fatalf("point %d: %s with %d bits", i, r.Case, r.Bits)
		}
		ci, err := stats.ClopperPearson(r.Errors, r.Bits, 0.999)
		if err != nil {
			t.Fatal(err)
		}
		if !ci.Contains(want) {
			t.Errorf("%s: %d errors in %d bits, 99.9%% interval [%.3g, %.3g] misses %.3g", r.Case, r.Errors, r.Bits, ci.Low, ci.High, want)
		}
	}
	if !bytes.Contains(CombinerSource(4321), []byte("\nconst bits = 4321\n")) {
		t.Error("CombinerSource does not set the bit count")
	}
}

// Report writes the custom-block section.
func TestCombinerReport(t *testing.T) {
	var b strings.Builder
	if err := combinerReport(t.Context(), Options{Bits: 20 * FrameBits, Rounds: 2}, &b); err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"combiner-loop   script", "combiner-vector script", "vector/loop=", "theory 1.599e-03"} {
		if !strings.Contains(b.String(), want) {
			t.Errorf("report lacks %q:\n%s", want, b.String())
		}
	}
}
