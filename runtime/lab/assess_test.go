package lab_test

import (
	"encoding/json"
	"fmt"
	"math"
	"strings"
	"testing"

	"tally/runtime/lab"
)

type intervalJSON struct {
	Errors      int64   `json:"errors"`
	Bits        int64   `json:"bits"`
	BER         float64 `json:"ber"`
	Low         float64 `json:"ci_low"`
	High        float64 `json:"ci_high"`
	Upper       float64 `json:"upper"`
	Method      string  `json:"method"`
	UpperMethod string  `json:"upper_method"`
	Confidence  float64 `json:"confidence"`
	Spec        *float64
	Met         *bool
}

func intervalOf(t *testing.T, args string) intervalJSON {
	t.Helper()
	code, out, errs := interval(args + " -json")
	var r intervalJSON
	if err := json.Unmarshal([]byte(out), &r); err != nil || code != 0 {
		t.Fatalf("interval %s: exit %d, %v, stderr %q:\n%s", args, code, err, errs, out)
	}
	return r
}

// plan and interval answer the lab's question the same way: the bits plan asks for, run back
// through interval with the errors allowed, show the spec met at that confidence, and one
// bit fewer does not (one rule, the one-sided exact limit, behind both; Clopper and Pearson,
// Biometrika 26, 1934).
func TestPlanAnswerRunsBackThroughInterval(t *testing.T) {
	for _, c := range []struct {
		ber, conf float64
		k         int64
	}{
		{1e-12, 0.95, 0}, {1e-12, 0.95, 10}, {1e-9, 0.99, 3}, {1e-6, 0.9, 0}, {1e-3, 0.999, 50},
		{1e-5, 0.999999999, 2}, {0.01, 0.6, 100},
	} {
		code, out, _ := plan(fmt.Sprintf("-ber %g -confidence %g -errors %d -json", c.ber, c.conf, c.k))
		var p struct{ Bits float64 }
		if err := json.Unmarshal([]byte(out), &p); err != nil || code != 0 {
			t.Fatalf("plan: exit %d, %v:\n%s", code, err, out)
		}
		n := int64(p.Bits)
		at := intervalOf(t, fmt.Sprintf("-errors %d -bits %d -confidence %g -ber %g", c.k, n, c.conf, c.ber))
		short := intervalOf(t, fmt.Sprintf("-errors %d -bits %d -confidence %g -ber %g", c.k, n-1, c.conf, c.ber))
		if at.Met == nil || !*at.Met || at.Upper > c.ber {
			t.Errorf("%+v: plan's %d bits: interval says upper %g, met %v", c, n, at.Upper, at.Met)
		}
		if short.Met == nil || *short.Met {
			t.Errorf("%+v: %d bits (one fewer than plan's) show the spec met (upper %g)", c, n-1, short.Upper)
		}
		// The text says the same.
		_, text, _ := interval(fmt.Sprintf("-errors %d -bits %d -confidence %g -ber %g", c.k, n, c.conf, c.ber))
		if !strings.Contains(text, ": met") {
			t.Errorf("%+v:\n%s", c, text)
		}
	}
}

// binomialTail is P(Bin(n, p) ≤ k), or P(Bin(n, p) ≥ k) when atLeast, summed term by term in
// logs (common practice, no source), each tail summed on its own side so that a small one
// keeps its digits: the reference for the limits below.
func binomialTail(k, n int64, p float64, atLeast bool) float64 {
	nf := float64(n)
	l1p, lp := math.Log1p(-p), math.Log(p)
	lc, sum := 0.0, 0.0
	for j := int64(0); j <= n; j++ {
		if j > 0 {
			lc += math.Log((nf - float64(j-1)) / float64(j))
		}
		lt := lc + float64(n-j)*l1p
		if j > 0 {
			lt += float64(j) * lp
		}
		switch {
		case !atLeast && j > k:
			return sum
		case atLeast && j < k:
			continue
		}
		term := math.Exp(lt)
		sum += term
		if atLeast && float64(j) > nf*p && term < 1e-30*sum {
			break
		}
	}
	return sum
}

// Every figure tally interval prints holds to 1e-6 relative against an independent
// reference, at every confidence it accepts: the ends of the two-sided interval solve
// P(Bin(n, low) ≥ k) = α/2 and P(Bin(n, high) ≤ k) = α/2, the one-sided limit
// P(Bin(n, upper) ≤ k) = α (Clopper and Pearson, Biometrika 26, 1934), each checked by the
// term-by-term binomial sum: the tail at the printed limit must equal its level to within
// what a 1e-6 shift of the limit moves it.
func TestIntervalAccuracyAtEveryConfidence(t *testing.T) {
	for _, c := range []struct{ k, n int64 }{{0, 1000}, {1, 1e6}, {10, 1e9}, {100, 1e12}, {1000, 1e7}, {20000, 1e6}} {
		for _, conf := range []float64{0.5000001, 0.8, 0.95, 0.99, 0.9999, 1 - 1e-7, lab.MaxConfidence} {
			r := intervalOf(t, fmt.Sprintf("-errors %d -bits %d -confidence %.10g", c.k, c.n, conf))
			alpha := 1 - conf
			check := func(name string, x, level float64, tail func(p float64) float64) {
				lo, hi := tail(x*(1-1e-6)), tail(x*(1+1e-6))
				if lo > hi {
					lo, hi = hi, lo
				}
				if !(level >= lo && level <= hi) {
					t.Errorf("k=%d n=%d conf %v: %s %.12g: tail %.6g..%.6g, want %.6g", c.k, c.n, conf, name, x, lo, hi, level)
				}
			}
			check("upper", r.Upper, alpha, func(p float64) float64 { return binomialTail(c.k, c.n, p, false) })
			if c.k == 0 {
				if math.Abs(r.High/r.Upper-1) > 1e-9 {
					t.Errorf("k=0: two-sided high %g is not the one-sided %g", r.High, r.Upper)
				}
				continue
			}
			check("high", r.High, alpha/2, func(p float64) float64 { return binomialTail(c.k, c.n, p, false) })
			check("low", r.Low, alpha/2, func(p float64) float64 { return binomialTail(c.k, c.n, p, true) })
		}
	}
}

// Text and JSON carry both figures, each named for what it is.
func TestIntervalTwoAndOneSided(t *testing.T) {
	code, out, _ := interval("-errors 10 -bits 1000000 -ber 2e-5")
	for _, want := range []string{"95 % two-sided interval (clopper-pearson): 4.8e-06 to 1.84e-05",
		"95 % one-sided upper limit: BER ≤ 1.7e-05", "Spec BER ≤ 2e-05: met"} {
		if code != 0 || !strings.Contains(out, want) {
			t.Errorf("exit %d, want %q in:\n%s", code, want, out)
		}
	}
	// One-sided 95 % limit for 10 events: 17.0 (Gehrels, ApJ 303, 1986, Table 1, 0.95
	// column, from memory): 1.70e-5 for 10 errors in 10⁶ bits, within the binomial's shift.
	r := intervalOf(t, "-errors 10 -bits 1000000 -ber 1e-5")
	if math.Abs(r.Upper*1e6-16.96) > 0.02 || r.Met == nil || *r.Met || r.Spec == nil || *r.Spec != 1e-5 || r.UpperMethod == "" || r.Method != "clopper-pearson" {
		t.Errorf("%+v", r)
	}
	_, out, _ = interval("-errors 10 -bits 1000000 -ber 1e-5")
	if !strings.Contains(out, "not shown") {
		t.Errorf("spec not met:\n%s", out)
	}
	// Stopped at the last error: the inverse-sampling figures, both sides.
	r = intervalOf(t, "-errors 100 -bits 10000000 -stopped")
	if r.Method != "negative-binomial" || !(r.Upper < r.High && r.Upper > r.BER) {
		t.Errorf("stopped: %+v", r)
	}
	// The case: plan's 16 962 219 235 722 bits for 10 errors at 1e-12 show the spec
	// with the one-sided limit, while the two-sided upper end lies above it.
	code, out, _ = plan("-ber 1e-12 -errors 10 -json")
	var p struct{ Bits float64 }
	json.Unmarshal([]byte(out), &p)
	r = intervalOf(t, fmt.Sprintf("-errors 10 -bits %.0f -ber 1e-12", p.Bits))
	if code != 0 || !*r.Met || !(r.High > 1e-12) {
		t.Errorf("%+v", r)
	}
}

// A minimum test time is rounded up, never down: 2 995 732 273 553 bits at 10 Gbit/s are
// 299.57 s, shown as 5 min 0 s.
func TestPlanTimeRoundsUp(t *testing.T) {
	for _, c := range []struct{ args, want string }{
		{"-ber 1e-12 -rate 10e9", "5 min 0 s"},
		{"-ber 1e-9 -rate 1e9", "3 s"},         // 2.9957 s
		{"-ber 1e-6 -rate 1e9", "3 ms"},        // 2.9957 ms
		{"-ber 1e-15 -rate 1e9", "34.7 days"},  // 2.9957e15 s / 86400 = 34.673 days
		{"-ber 1e-10 -rate 1e6", "8 h 20 min"}, // 29957.3 s = 8 h 19.29 min
	} {
		code, out, _ := plan(c.args)
		if code != 0 || !strings.Contains(out, c.want) {
			t.Errorf("%s: exit %d, want %q:\n%s", c.args, code, c.want, out)
		}
	}
}

// -rate takes the trade's SI prefixes.
func TestPlanRateSuffixes(t *testing.T) {
	for _, c := range []struct {
		rate string
		bps  float64
	}{{"10G", 10e9}, {"2.5G", 2.5e9}, {"100M", 100e6}, {"64k", 64e3}, {"1T", 1e12}, {"10e9", 10e9}, {"10Gbit/s", 10e9}, {"155.52M", 155.52e6}} {
		code, out, errs := plan("-ber 1e-12 -json -rate " + c.rate)
		var r struct{ Rate, Bits, Seconds float64 }
		if err := json.Unmarshal([]byte(out), &r); err != nil || code != 0 || r.Rate != c.bps || math.Abs(r.Seconds-r.Bits/c.bps) > 1e-9*r.Seconds {
			t.Errorf("-rate %s: exit %d %q, %+v", c.rate, code, errs, r)
		}
	}
}

// Inputs with no meaningful answer are refused with exit 2 and a plain sentence; no
// numerical library's wording reaches the user.
func TestNoMeaningfulAnswerRefused(t *testing.T) {
	for _, c := range []struct {
		cmd  func(string) (int, string, string)
		args string
		want string
	}{
		{plan, "-ber 1e-12 -rate 1e-300", "billion years"},
		{plan, "-ber 1e-12 -rate 1e-300 -json", "billion years"},
		{plan, "-ber 1e-9 -confidence 0.9999999999999999", "too close to 1"},
		{plan, "-ber 1e-9 -confidence 1e-300", "coin toss"},
		{plan, "-ber 1e-9 -confidence 0.3", "coin toss"},
		{interval, "-errors 0 -bits 590 -confidence 0.9999999999999999", "too close to 1"},
		{interval, "-errors 3 -bits 10 -confidence 0.5", "coin toss"},
		{plan, "-ber 1e-9 -rate 10X", "not a line rate"},
		{interval, "-errors 1 -bits 10 -ber 2", "-ber 2 must lie"},
	} {
		code, out, errs := c.cmd(c.args)
		if code != 2 || out != "" || !strings.Contains(errs, c.want) {
			t.Errorf("%q: exit %d, stdout %q, stderr %q; want exit 2 and %q", c.args, code, out, errs, c.want)
		}
		for _, lib := range libraryWords {
			if strings.Contains(errs, lib) {
				t.Errorf("%q: library wording %q in %q", c.args, lib, errs)
			}
		}
	}
	// The most the double can carry still gives the exact answer: 1 − (1−C)^(1/n).
	r := intervalOf(t, "-errors 0 -bits 590 -confidence 0.999999999")
	if want := -math.Expm1(math.Log(1e-9) / 590); math.Abs(r.Upper/want-1) > 1e-6 {
		t.Errorf("upper %g, want %g", r.Upper, want)
	}
}

// libraryWords are phrases of the numerical libraries that must never reach a user.
var libraryWords = []string{"cephes", "Initial interval", "bounding interval", "panic", "mathext", "distuv", "gonum", "stats:"}
