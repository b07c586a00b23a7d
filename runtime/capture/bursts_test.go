package capture

import "testing"

// Bursts injected at known places with known lengths and errors give exactly those burst
// statistics (the guard-space definition in bursts.go; common practice, no source).
func TestInjectedBurstsExact(t *testing.T) {
	b := prbsBits(t, 23, 240_000, true)
	type burst struct{ start, length, step int } // errors at start, start+step, … and at the last bit
	bursts := []burst{{10_000, 1, 1}, {50_000, 5, 2}, {90_000, 40, 10}, {130_000, 200, 2}, {170_000, 600, 2}}
	total := 0
	for _, u := range bursts {
		n := 0
		for i := 0; i < u.length; i += u.step {
			b[u.start+i] ^= 1
			n++
		}
		if (u.length-1)%u.step != 0 {
			b[u.start+u.length-1] ^= 1
			n++
		}
		total += n
	}
	c := countBytes(t, pack(b, false), Options{PRBS: 23})
	br := c.Bursts
	// errors: 1 + 3 + (0, 10, 20, 30, 39 →) 5 + (100 + the last bit) 101 + 301
	if c.Errors != int64(total) || total != 411 {
		t.Fatalf("errors %d, injected %d", c.Errors, total)
	}
	if br.Count != 5 || br.Multi != 4 || br.MaxLength != 600 || br.MaxErrors != 301 || br.MaxStart != 170_000 {
		t.Errorf("bursts %d (multi %d), longest %d bits with %d errors at %d", br.Count, br.Multi, br.MaxLength, br.MaxErrors, br.MaxStart)
	}
	if br.LengthSum != 1+5+40+200+600 {
		t.Errorf("length sum %d", br.LengthSum)
	}
	// lengths 1, 5, 40, 200, 600 fall in the power-of-two bins 0, 2, 5, 7, 9
	for i, n := range br.Lengths {
		want := int64(0)
		switch i {
		case 0, 2, 5, 7, 9:
			want = 1
		}
		if n != want {
			t.Errorf("length bin %d: %d bursts, want %d", i, n, want)
		}
	}
	// gaps: one between each pair of consecutive errors; those inside bursts are short
	if br.Gaps != int64(total-1) || br.ShortGaps != int64(total-5) {
		t.Errorf("gaps %d (short %d), want %d (%d)", br.Gaps, br.ShortGaps, total-1, total-5)
	}
	if c.NSlips != 0 || c.Lost != 0 {
		t.Errorf("a dense burst is not a slip: slips %d, lost %d", c.NSlips, c.Lost)
	}
}
