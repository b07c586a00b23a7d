package output

import (
	"strings"
	"testing"

	"tally/runtime/result"
)

// A figure that rounds to zero is written without a sign: "-0.00 dB" reads as a loss where
// there is none (common practice, no source). A crossing at −0.003 dB is "0.00", and a
// distance of 0.003 dB on an axis that is not a signal-to-noise ratio is "the same".
func TestNoSignedZero(t *testing.T) {
	r := &result.Run{Params: []string{"backoff_db"}}
	s := targetLine(r, result.Target{Tap: "ber", Rate: 1e-5, Found: true, X: -0.003, Low: -0.004, High: 0.2,
		Against: "coherent", Penalty: -0.003, Gain: 0.002, GainOver: "BPSK"})
	for _, want := range []string{"at backoff_db = 0.00, interval [0.00, 0.20]", "at the same backoff_db as coherent", "at the same backoff_db as BPSK"} {
		if !strings.Contains(s, want) {
			t.Errorf("%q lacks %q", s, want)
		}
	}
	if strings.Contains(s, "-0.") || strings.Contains(s, "−0") {
		t.Errorf("%q has a signed zero", s)
	}
	for _, c := range []struct {
		v          float64
		unit, want string
	}{{-0.003, "dB", "0.00"}, {-0.0000001, "", "-1e-07"}, {-0.01, "dB", "-0.01"}, {0, "dB", "0.00"}, {-0.0004, "", "-0.0004"}} {
		if got := result.AxisValue(c.v, c.unit); got != c.want {
			t.Errorf("AxisValue(%g, %q) = %q, want %q", c.v, c.unit, got, c.want)
		}
	}
}
