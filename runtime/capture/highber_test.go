package capture

import "testing"

// Slips on a poor link (BER 1e-2 to 6e-2): still found exactly, every injected error counted
// and no other.
func TestSlipsAtHighBER(t *testing.T) {
	for _, p := range []float64{1e-2, 6e-2} {
		b := prbsBits(t, 23, 400_000, false)
		capt, at1, at2 := slipped(b, 100_000, 250_000)
		capt = capt[:399_992]
		errs := randomErrors(capt, p, 5)
		c := countBytes(t, pack(capt, false), Options{PRBS: 23})
		if c.Errors != int64(len(errs)) || c.Lost != 0 || len(c.Slips) != 2 || c.Slips[0].Shift != 1 || c.Slips[1].Shift != -1 ||
			abs64(c.Slips[0].Bit-int64(at1)) > 4 || abs64(c.Slips[1].Bit-int64(at2)) > 4 {
			t.Errorf("BER %g: errors %d (injected %d), lost %d, slips %+v", p, c.Errors, len(errs), c.Lost, c.Slips)
		}
	}
}
