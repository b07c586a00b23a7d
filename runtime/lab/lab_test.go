package lab_test

import (
	"bytes"
	"encoding/json"
	"io"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"

	"tally/runtime/lab"
)

// call runs a command on space-separated arguments.
func call(cmd func([]string, io.Writer, io.Writer) int, args string) (code int, stdout, stderr string) {
	var o, e bytes.Buffer
	code = cmd(strings.Fields(args), &o, &e)
	return code, o.String(), e.String()
}

func plan(args string) (int, string, string)     { return call(lab.Plan, args) }
func interval(args string) (int, string, string) { return call(lab.Interval, args) }

// One-sided 95 % Poisson upper limits for 0 to 3 events: 2.996, 4.744, 6.296, 7.754
// (Gehrels, "Confidence limits for small numbers of events", ApJ 303, 1986, Table 1; from
// memory). Bits to claim a BER with at most k errors are that limit over the BER.
func TestBitsToClaimPoissonLimits(t *testing.T) {
	for k, mu := range []float64{2.996, 4.744, 6.296, 7.754} {
		for _, ber := range []float64{1e-6, 1e-12} {
			got := lab.BitsToClaim(ber, 0.95, int64(k)) * ber
			if math.Abs(got-mu) > 0.0015 {
				t.Errorf("k=%d, BER %g: %.4f/BER bits, want %.3f/BER", k, ber, got, mu)
			}
		}
	}
}

// With no errors the fewest bits have a closed form: the one-sided Clopper–Pearson limit
// 1 − (1−C)^(1/n) reaches the BER at n = ln(1 − C)/ln(1 − BER) (Clopper and Pearson,
// Biometrika 26, 1934; ≈ −ln(1 − C)/BER, the rule of three at 95 %, Hanley and
// Lippman-Hand, JAMA 249, 1983). With k errors the Poisson probability of at most k errors
// at that many bits (gonum's Poisson distribution; the binomial differs from it by about
// BER·k relative) is 1 − confidence. The reverse gives back the confidence, and one bit
// fewer does not reach it.
func TestBitsToClaimBinomial(t *testing.T) {
	for _, conf := range []float64{0.9, 0.95, 0.99} {
		for _, ber := range []float64{1e-9, 1e-3} {
			n := lab.BitsToClaim(ber, conf, 0)
			if want := math.Ceil(math.Log(1-conf) / math.Log1p(-ber)); n != want {
				t.Errorf("conf %v, BER %g: %v bits, want %v", conf, ber, n, want)
			}
		}
		for _, k := range []int64{0, 1, 5, 20, 100} {
			n := lab.BitsToClaim(1e-9, conf, k)
			if p := (distuv.Poisson{Lambda: n * 1e-9}).CDF(float64(k)); math.Abs(p-(1-conf)) > 1e-6 {
				t.Errorf("conf %v, k=%d: P(≤ k errors in %v bits) = %g, want %g", conf, k, n, p, 1-conf)
			}
			if c := lab.ConfidenceReached(1e-9, k, n); c < conf || lab.ConfidenceReached(1e-9, k, n-1) >= conf {
				t.Errorf("conf %v, k=%d: reverse %v", conf, k, c)
			}
		}
	}
}

func TestPlanOutput(t *testing.T) {
	code, out, _ := plan("-ber 1e-12 -rate 10e9")
	if code != 0 || !strings.Contains(out, "2 995 732 273 553 bits") || !strings.Contains(out, "10 Gbit/s") || !strings.Contains(out, "5 min 0 s") {
		t.Errorf("exit %d:\n%s", code, out)
	}
	code, out, _ = plan("-ber 1e-12 -errors 3 -rate 25e9 -json")
	var r struct {
		BER, Confidence, Bits float64
		Errors                int64
		Seconds               *float64
	}
	if err := json.Unmarshal([]byte(out), &r); err != nil || code != 0 {
		t.Fatalf("exit %d, %v:\n%s", code, err, out)
	}
	if r.BER != 1e-12 || r.Confidence != 0.95 || r.Errors != 3 || r.Seconds == nil || math.Abs(*r.Seconds-r.Bits/25e9) > 1e-9 {
		t.Errorf("%+v", r)
	}
	// Without a rate, no time.
	_, out, _ = plan("-ber 1e-9 -json")
	if strings.Contains(out, "seconds") {
		t.Errorf("seconds without a rate:\n%s", out)
	}
	// Reverse: 3e12 bits with no errors show 1e-12 at 1 − e⁻³ = 95.02 %.
	code, out, _ = plan("-ber 1e-12 -bits 3e12")
	if code != 0 || !strings.Contains(out, "95.02 %") {
		t.Errorf("exit %d:\n%s", code, out)
	}
}

func TestIntervalOutput(t *testing.T) {
	code, out, _ := interval("-errors 10 -bits 1e6 -json")
	var r struct {
		BER        float64 `json:"ber"`
		Low        float64 `json:"ci_low"`
		High       float64 `json:"ci_high"`
		Confidence float64 `json:"confidence"`
		Method     string  `json:"method"`
	}
	if err := json.Unmarshal([]byte(out), &r); err != nil || code != 0 {
		t.Fatalf("exit %d, %v:\n%s", code, err, out)
	}
	// Garwood's exact Poisson limits for 10 events at 95 %: 4.795 and 18.39 (Garwood,
	// Biometrika 28, 1936; from memory).
	if r.BER != 1e-5 || math.Abs(r.Low*1e6-4.795) > 0.002 || math.Abs(r.High*1e6-18.39) > 0.01 || r.Method != "clopper-pearson" || r.Confidence != 0.95 {
		t.Errorf("%+v", r)
	}
	code, out, _ = interval("-errors 0 -bits 1e6")
	if code != 0 || !strings.Contains(out, "BER ≤ 3e-06") || !strings.Contains(out, "one-sided") {
		t.Errorf("exit %d:\n%s", code, out)
	}
	code, out, _ = interval("-errors 100 -bits 1e7 -stopped -json")
	if code != 0 || !strings.Contains(out, `"method": "negative-binomial"`) || !strings.Contains(out, `"ber": 0.0000099`) {
		t.Errorf("exit %d:\n%s", code, out)
	}
	for _, m := range []string{"wilson", "jeffreys"} {
		if _, out, _ := interval("-errors 3 -bits 1000 -json -method " + m); !strings.Contains(out, `"method": "`+m+`"`) {
			t.Errorf("method %s:\n%s", m, out)
		}
	}
}

func TestBadInput(t *testing.T) {
	for _, c := range []struct {
		cmd  func(string) (int, string, string)
		args string
		want string
	}{
		{plan, "", "-ber is required"},
		{plan, "-ber 0", "-ber 0 must lie"},
		{plan, "-ber 1", "-ber 1 must lie"},
		{plan, "-ber -1e-9", "-ber -1e-09 must lie"},
		{plan, "-ber NaN", "-ber NaN"},
		{plan, "-ber +Inf", "-ber +Inf"},
		{plan, "-ber x", "invalid value"},
		{plan, "-ber 1e-9 -confidence 1", "-confidence 1 must lie"},
		{plan, "-ber 1e-9 -confidence 95", "0.95 is 95 %"},
		{plan, "-ber 1e-9 -confidence NaN", "-confidence NaN"},
		{plan, "-ber 1e-9 -errors -1", "negative"},
		{plan, "-ber 1e-9 -errors 2.5", "not a whole number"},
		{plan, "-ber 1e-9 -errors NaN", "not a finite number"},
		{plan, "-ber 1e-9 -errors 1e30", "too large"},
		{plan, "-ber 1e-9 -rate 0", "-rate 0"},
		{plan, "-ber 1e-9 -rate -5", "-rate -5"},
		{plan, "-ber 1e-9 -bits 0", "-bits 0"},
		{plan, "-ber 1e-9 -bits 10 -errors 11", "exceed"},
		{plan, "-ber 1e-9 -bits 1e9 -confidence 0.9", "not both"},
		{plan, "-ber 1e-300", "too small"},
		{plan, "-ber 1e-9 extra", `unexpected argument "extra"`},
		{plan, "-nope", "flag provided but not defined"},
		{interval, "", "-errors is required"},
		{interval, "-errors 3", "-bits is required"},
		{interval, "-bits 3", "-errors is required"},
		{interval, "-errors 4 -bits 3", "exceed"},
		{interval, "-errors 0 -bits 0", "-bits 0"},
		{interval, "-errors -1 -bits 3", "negative"},
		{interval, "-errors 1 -bits NaN", "not a finite"},
		{interval, "-errors 1 -bits 10 -confidence 0", "-confidence 0 must lie"},
		{interval, "-errors 1 -bits 10 -method wald", `unknown interval method "wald"`},
		{interval, "-errors 0 -bits 10 -stopped", "-stopped needs"},
	} {
		code, out, errs := c.cmd(c.args)
		if code != 2 || out != "" || !strings.Contains(errs, c.want) {
			t.Errorf("%q: exit %d, stdout %q, stderr %q; want exit 2 and %q", c.args, code, out, errs, c.want)
		}
	}
}

func TestHelp(t *testing.T) {
	for name, cmd := range map[string]func(string) (int, string, string){"plan": plan, "interval": interval} {
		code, out, errs := cmd("-h")
		if code != 0 || !strings.HasPrefix(out, "usage: tally "+name) || errs != "" {
			t.Errorf("%s -h: exit %d, stdout %q, stderr %q", name, code, out, errs)
		}
	}
}
