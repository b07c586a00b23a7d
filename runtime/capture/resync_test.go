package capture

import "testing"

// Garbage in mid-capture (a receiver that lost its input and emitted noise) is given up as
// bits not compared, not counted as errors; the alignment after it is found again.
func TestGarbageIsLostNotErrors(t *testing.T) {
	for _, c := range []struct {
		name    string
		garbage int
		known   bool // the shift can be named (PRBS: within maxShift bits)
	}{
		{"short", 2000, true},
		{"long", 300_000, false}, // past maxHunt: given up, then regained
	} {
		b := prbsBits(t, 23, 200_000, false)
		errs := randomErrors(b, 1e-4, 4)
		var capt []byte
		capt = append(capt, b[:100_000]...)
		capt = append(capt, randomRef(c.garbage, 8)...)
		capt = append(capt, b[100_000:]...)
		capt = capt[:len(capt)/8*8]
		k := countBytes(t, pack(capt, false), Options{PRBS: 23})
		if k.Errors != int64(len(errs)) {
			t.Errorf("%s: %d errors, injected %d", c.name, k.Errors, len(errs))
		}
		if len(k.Slips) != 1 {
			t.Fatalf("%s: slips %+v", c.name, k.Slips)
		}
		s := k.Slips[0]
		if !s.Regained || s.Known != c.known || (c.known && s.Shift != -int64(c.garbage)) {
			t.Errorf("%s: %+v", c.name, s)
		}
		// the garbage agrees with the pattern by chance at its edges, so a few of its bits may
		// be compared (correctly, as no error)
		if s.Lost > int64(c.garbage) || s.Lost < int64(c.garbage)-16 || k.Lost != s.Lost || abs64(s.Bit-100_000) > 16 {
			t.Errorf("%s: lost %d (in all %d) from bit %d, want about %d from 100 000", c.name, s.Lost, k.Lost, s.Bit, c.garbage)
		}
	}
}

// A capture that ends in garbage reports the alignment lost and not regained.
func TestLostAtTheEnd(t *testing.T) {
	b := append(prbsBits(t, 9, 50_000, false), randomRef(5000, 2)...)
	b = b[:len(b)/8*8]
	k := countBytes(t, pack(b, false), Options{PRBS: 9})
	if k.Errors != 0 || len(k.Slips) != 1 || k.Slips[0].Regained || abs64(k.Slips[0].Bit-50_000) > 16 || k.Lost < 4980 {
		t.Errorf("errors %d, slips %+v, lost %d", k.Errors, k.Slips, k.Lost)
	}
}

// cut on hand-made masks: the split that costs least, by the rule in resync.go.
func TestCut(t *testing.T) {
	mask := func(n int, set ...int) []uint64 {
		m := make([]uint64, (n+63)/64)
		for _, p := range set {
			m[p/64] |= 1 << (p % 64)
		}
		return m
	}
	// old alignment clean up to 100, new clean from 100: split at 100, nothing lost
	var oldSet, newSet []int
	for i := 100; i < 200; i += 2 {
		oldSet = append(oldSet, i)
	}
	for i := 1; i < 100; i += 2 {
		newSet = append(newSet, i)
	}
	s1, s2, lo, hi := cut(mask(200, oldSet...), mask(200, newSet...), 200)
	if s1 != 100 || s2 != 100 || lo != 100 || hi != 100 {
		t.Errorf("clean slip: %d %d [%d %d]", s1, s2, lo, hi)
	}
	// 80 bits of garbage (every bit wrong both ways) between 60 and 140: lost
	oldSet, newSet = nil, nil
	for i := 60; i < 200; i++ {
		oldSet = append(oldSet, i)
	}
	for i := 0; i < 140; i++ {
		newSet = append(newSet, i)
	}
	s1, s2, _, _ = cut(mask(200, oldSet...), mask(200, newSet...), 200)
	if s1 != 60 || s2 != 140 {
		t.Errorf("garbage: %d %d", s1, s2)
	}
	// one true error beside the slip is an error, not a lost bit (lost costs 8 errors more)
	s1, s2, _, _ = cut(mask(200, 99, 150), mask(200, 20, 99), 200)
	if s1 != s2 {
		t.Errorf("a single error was given up as lost: %d %d", s1, s2)
	}
}

// A long stretch of errors too dense for the lock check (BER 0.15 over 200 000 bits, longer
// than the search window) but with the alignment unchanged is counted as errors: no slip, no
// bit lost.
func TestLongDenseStretchIsErrors(t *testing.T) {
	b := prbsBits(t, 31, 600_000, true)
	fade := b[200_000:400_000]
	n := len(randomErrors(fade, 0.15, 6))
	n += len(randomErrors(b[:200_000], 1e-4, 7))
	k := countBytes(t, pack(b, false), Options{PRBS: 31})
	if k.Errors != int64(n) || k.NSlips != 0 || k.Lost != 0 {
		t.Errorf("errors %d (injected %d), slips %d, lost %d", k.Errors, n, k.NSlips, k.Lost)
	}
}
