package output

import (
	"strings"
	"testing"

	"tally/runtime/result"
)

// A target's distance to theory or to the first curve is worded in the axis's own unit: in dB
// with the trade's "needs … dB more/less" only on a signal-to-noise axis in dB; on any other
// axis as "at a higher/lower <axis>", with the unit its name carries (common practice, no
// source: a larger sampling offset or roll-off is not by itself the worse result).
func TestTargetWording(t *testing.T) {
	for _, c := range []struct {
		param         string
		penalty, gain float64
		want, not     []string
	}{
		{"ebn0_db", 0.42, 1.5, []string{"needs 0.42 dB more than coherent", "needs 1.50 dB less than BPSK"}, []string{"at a"}},
		{"ebn0_db", -0.1, -0.25, []string{"needs 0.10 dB less than coherent", "needs 0.25 dB more than BPSK"}, nil},
		{"esn0_db", 0.004, 0, []string{"the same as coherent (within 0.01 dB)", "the same as BPSK (within 0.01 dB)"}, []string{"0.00"}},
		{"offset", 0.03, 0.012, []string{"at a higher offset than coherent (by 0.03)", "at a lower offset than BPSK (by 0.012)"}, []string{"dB", "needs"}},
		{"rolloff", -0.03, 0, []string{"at a lower rolloff than coherent (by 0.03)", "at the same rolloff as BPSK"}, []string{"dB", "needs"}},
		{"drift_ppm", 2.5, -1, []string{"at a higher drift_ppm than coherent (by 2.5 ppm)", "at a higher drift_ppm than BPSK (by 1 ppm)"}, []string{"dB"}},
		{"backoff_db", 0.5, 0.2, []string{"at a higher backoff_db than coherent (by 0.50 dB)", "at a lower backoff_db than BPSK (by 0.20 dB)"}, []string{"needs"}},
	} {
		r := &result.Run{Params: []string{c.param}}
		pen := targetLine(r, result.Target{Tap: "ber", Rate: 1e-5, Found: true, X: 5, Low: 4.9, High: 5.1, Against: "coherent", Penalty: c.penalty})
		gain := targetLine(r, result.Target{Tap: "ber", Rate: 1e-5, Found: true, X: 5, Low: 4.9, High: 5.1, Gain: c.gain, GainOver: "BPSK"})
		got := pen + " | " + gain
		for _, w := range c.want {
			if !strings.Contains(got, w) {
				t.Errorf("%s: %q lacks %q", c.param, got, w)
			}
		}
		for _, w := range c.not {
			if strings.Contains(got, w) {
				t.Errorf("%s: %q has %q", c.param, got, w)
			}
		}
	}
}
