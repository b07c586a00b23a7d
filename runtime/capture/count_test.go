package capture

import (
	"testing"
)

func TestCleanPRBS(t *testing.T) {
	for _, order := range PRBSOrders {
		for _, inv := range []bool{false, true} {
			b := prbsBits(t, order, 200_000, inv)
			c := countBytes(t, pack(b, false), Options{PRBS: order})
			if c.Errors != 0 || c.Compared != c.Bits || c.Bits != int64(len(b)) || c.Inverted != inv || c.NSlips != 0 {
				t.Errorf("order %d inv %v: errors %d compared %d of %d, inverted %v, slips %d", order, inv, c.Errors, c.Compared, c.Bits, c.Inverted, c.NSlips)
			}
		}
	}
}

// slipped drops the pattern bit at drop (the capture then runs one bit ahead: shift +1) and
// repeats the bit before dup (shift −1); positions are in the pattern's bits, drop < dup.
// It returns the capture and the capture positions of the two slips.
func slipped(b []byte, drop, dup int) ([]byte, int, int) {
	var out []byte
	out = append(out, b[:drop]...)
	out = append(out, b[drop+1:dup]...)
	at2 := len(out)
	out = append(out, b[dup-1])
	out = append(out, b[dup:]...)
	return out, drop, at2
}

func TestSlipsFoundWithoutSpuriousErrors(t *testing.T) {
	for _, order := range []int{7, 15, 23, 31} {
		b := prbsBits(t, order, 400_000, false)
		capt, at1, at2 := slipped(b, 100_000, 250_000)
		capt = capt[:399_992]
		errs := randomErrors(capt, 1e-4, uint64(order))
		for _, lsb := range []bool{false, true} {
			c := countBytes(t, pack(capt, lsb), Options{PRBS: order, LSB: lsb})
			if c.Errors != int64(len(errs)) {
				t.Errorf("order %d: %d errors counted, %d injected", order, c.Errors, len(errs))
			}
			if c.NSlips != 2 || len(c.Slips) != 2 {
				t.Fatalf("order %d: slips %+v", order, c.Slips)
			}
			for i, want := range []struct {
				at    int
				shift int64
			}{{at1, +1}, {at2, -1}} {
				s := c.Slips[i]
				if s.Shift != want.shift || !s.Known || s.Lost != 0 || int(s.Bit) > want.at+1 || int(s.Bit+s.Spread) < want.at-1 {
					t.Errorf("order %d slip %d: %+v, want shift %d at %d", order, i, s, want.shift, want.at)
				}
			}
			if c.Lost != 0 || c.Compared != c.Bits {
				t.Errorf("order %d: lost %d, compared %d of %d", order, c.Lost, c.Compared, c.Bits)
			}
		}
	}
}

// Two slips that cancel a few hundred bits apart (a clock that slipped and caught up): both
// found, no errors left between them.
func TestCancellingSlips(t *testing.T) {
	for _, gap := range []int{400, 1000} {
		b := prbsBits(t, 23, 200_000, false)
		capt, at1, at2 := slipped(b, 100_000, 100_000+gap)
		capt = capt[:199_992]
		errs := randomErrors(capt, 1e-4, 3)
		c := countBytes(t, pack(capt, false), Options{PRBS: 23})
		if c.Errors != int64(len(errs)) || len(c.Slips) != 2 || c.Slips[0].Shift != 1 || c.Slips[1].Shift != -1 ||
			abs64(c.Slips[0].Bit-int64(at1)) > 4 || abs64(c.Slips[1].Bit-int64(at2)) > 4 {
			t.Errorf("gap %d: errors %d (injected %d), slips %+v (at %d and %d)", gap, c.Errors, len(errs), c.Slips, at1, at2)
		}
	}
}
