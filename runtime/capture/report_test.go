package capture

import (
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"
)

// The one-sided limits against gonum's Beta quantiles (the definitions in limits.go, Clopper
// and Pearson, Biometrika 26, 1934), on both sides of C = ½ where the computation differs.
func TestLimitsAgainstBetaQuantiles(t *testing.T) {
	for _, c := range []struct {
		k, n int64
		conf float64
	}{{1, 1000, 0.95}, {10, 100_000, 0.9}, {37, 5_000, 0.99}, {5, 200, 0.4}, {199, 200, 0.8}} {
		up, err := upperLimit(c.k, c.n, c.conf)
		if err != nil {
			t.Fatal(err)
		}
		want := distuv.Beta{Alpha: float64(c.k + 1), Beta: float64(c.n - c.k)}.Quantile(c.conf)
		if math.Abs(up-want) > 1e-9*want {
			t.Errorf("upper(%d, %d, %v) = %v, Beta quantile %v", c.k, c.n, c.conf, up, want)
		}
		lo, err := lowerLimit(c.k, c.n, c.conf)
		if err != nil {
			t.Fatal(err)
		}
		want = distuv.Beta{Alpha: float64(c.k), Beta: float64(c.n - c.k + 1)}.Quantile(1 - c.conf)
		if math.Abs(lo-want) > 1e-9*want {
			t.Errorf("lower(%d, %d, %v) = %v, Beta quantile %v", c.k, c.n, c.conf, lo, want)
		}
	}
	// No errors: 1 − (1−C)^(1/n), about −ln(1−C)/n, the "rule of three" at 95 % (Hanley and
	// Lippman-Hand, JAMA 249, 1983), also past gonum's Beta range.
	for _, n := range []int64{3_000_000, 1e12} {
		up, _ := upperLimit(0, n, 0.95)
		if want := -math.Log(0.05) / float64(n); math.Abs(up-want) > 1e-6*want {
			t.Errorf("upper(0, %d) = %v, want %v", n, up, want)
		}
	}
}

func TestParseRate(t *testing.T) {
	for in, want := range map[string]int64{"10G": 10_000_000_000, "2.5G": 2_500_000_000, "100M": 100_000_000,
		"155.52M": 155_520_000, "64k": 64_000, "2.048 Mbit/s": 2_048_000, "1e9": 1_000_000_000, "9600 bps": 9600} {
		if got, err := ParseRate(in); err != nil || got != want {
			t.Errorf("%q: %d, %v; want %d", in, got, err, want)
		}
	}
	for _, in := range []string{"", "10X", "G", "0.5", "1.5", "-1M", "NaN", "1e20"} {
		if _, err := ParseRate(in); err == nil {
			t.Errorf("%q accepted", in)
		}
	}
}

// Verdicts: 3 000 000 bits without an error show BER ≤ 1e-6 at 95 % (−ln 0.05 / 3e6 =
// 9.99e-7, the 3/BER rule, common practice); 100 errors in 1e6 bits fail 1e-5.
func TestVerdicts(t *testing.T) {
	mk := func(k, n int64) *Counts {
		return &Counts{Compared: n, Bits: n, Errors: k, Bursts: newBursts(64), Slips: []Slip{}, Interval: n}
	}
	for _, c := range []struct {
		k, n int64
		spec float64
		want string
	}{
		{0, 3_000_000, 1e-6, "meets"},
		{0, 3_000_000, 5e-7, "not decided"},
		{100, 1_000_000, 1e-5, "fails"},
		{100, 1_000_000, 1e-4, "not decided"},
	} {
		r, err := Analyse(mk(c.k, c.n), 0.95, "", c.spec)
		if err != nil {
			t.Fatal(err)
		}
		if !strings.HasPrefix(r.Verdict, c.want) {
			t.Errorf("%d in %d against %v: %q", c.k, c.n, c.spec, r.Verdict)
		}
	}
}

// Clustered errors widen the interval: errors all in one row of many give a large index of
// dispersion, a wider interval than the binomial one, and say so in the method.
func TestClusteredWidens(t *testing.T) {
	b := prbsBits(t, 15, 1<<20, true)
	for i := 500_000; i < 500_000+4000; i += 40 {
		b[i] ^= 1
	}
	randomErrors(b, 1e-5, 1)
	c := countBytes(t, pack(b, false), Options{PRBS: 15, Interval: 1 << 14})
	r, err := Analyse(c, 0.95, "", 0)
	if err != nil {
		t.Fatal(err)
	}
	if !r.Clustered || r.Dispersion == nil || *r.Dispersion < 10 || r.High <= r.PlainHigh || r.Upper <= r.PlainUpper ||
		!strings.HasSuffix(r.Method, "+clustered") || !strings.Contains(Text(r), "errors come in clusters") {
		t.Errorf("clustered %v, D %v, high %v vs %v, method %s", r.Clustered, r.Dispersion, r.High, r.PlainHigh, r.Method)
	}
}
