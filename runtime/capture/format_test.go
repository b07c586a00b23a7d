package capture

import (
	"bytes"
	"errors"
	"testing"
)

// Every format and bit order of the same received bits gives the same count. The encodings
// are written by the test's own packers (pack, asASCII, asHex), independent of the reader.
func TestEveryFormatAndBitOrder(t *testing.T) {
	b := prbsBits(t, 11, 80_000, false)
	errs := randomErrors(b, 1e-3, 3)
	type enc struct {
		name string
		data []byte
		f    Format
		lsb  bool
	}
	for _, e := range []enc{
		{"bin msb-first", pack(b, false), Binary, false},
		{"bin lsb-first", pack(b, true), Binary, true},
		{"ascii", asASCII(b), ASCII, false},
		{"hex msb-first", asHex(b, false), Hex, false},
		{"hex lsb-first", asHex(b, true), Hex, true},
	} {
		c := countBytes(t, e.data, Options{PRBS: 11, Format: e.f, LSB: e.lsb})
		if c.Errors != int64(len(errs)) || c.Bits != int64(len(b)) || c.Compared != c.Bits {
			t.Errorf("%s: %d errors in %d of %d bits, want %d errors in all %d", e.name, c.Errors, c.Compared, c.Bits, len(errs), len(b))
		}
		// the wrong bit order never locks: a PRBS read backwards within bytes is not the PRBS
		if e.f != ASCII {
			_, err := Count(bytes.NewReader(e.data), Options{PRBS: 11, Format: e.f, LSB: !e.lsb})
			if !errors.Is(err, ErrNoLock) {
				t.Errorf("%s read in the other bit order: %v, want no lock", e.name, err)
			}
		}
	}
}

func TestBadCaptures(t *testing.T) {
	good := asASCII(prbsBits(t, 7, 1000, false))
	bad := append(append([]byte{}, good[:500]...), 'x')
	bad = append(bad, good[500:]...)
	random := make([]byte, 4096)
	for i := range random {
		random[i] = byte(i*97 + i*i*31 + 7)
	}
	for _, c := range []struct {
		name string
		data []byte
		o    Options
		want func(error) bool
	}{
		{"ascii with a letter", bad, Options{PRBS: 7, Format: ASCII}, func(err error) bool {
			var fe *FormatError
			return errors.As(err, &fe) && fe.Offset == 500
		}},
		{"hex with an odd digit", []byte("a5 3c 7"), Options{PRBS: 7, Format: Hex}, func(err error) bool {
			var fe *FormatError
			return errors.As(err, &fe) && fe.Offset == 6
		}},
		{"ascii text read as bin", good, Options{PRBS: 7}, func(err error) bool {
			var fe *FormatError
			return errors.As(err, &fe) && fe.Offset == 0
		}},
		{"empty", nil, Options{PRBS: 7}, func(err error) bool { return errors.Is(err, ErrEmpty) }},
		{"white space only", []byte(" \n\n "), Options{PRBS: 7, Format: ASCII}, func(err error) bool { return errors.Is(err, ErrEmpty) }},
		{"not the pattern", random, Options{PRBS: 23}, func(err error) bool {
			var nl *NoLockError
			return errors.As(err, &nl) && nl.Bytes == 4096 && nl.Bits == 4096*8
		}},
		{"all zeros", make([]byte, 4096), Options{PRBS: 9}, func(err error) bool { return errors.Is(err, ErrNoLock) }},
	} {
		_, err := Count(bytes.NewReader(c.data), c.o)
		if !c.want(err) {
			t.Errorf("%s: %v", c.name, err)
		}
	}
}

// A capture that does not lock as declared gets the settings it locks with.
func TestGuess(t *testing.T) {
	b := pack(prbsBits(t, 20, 80_000, false), true)
	if g := Guess(b, Binary); g != "its first 10000 bytes lock with -prbs 20 -lsb" {
		t.Errorf("guess %q", g)
	}
	if g := Guess(make([]byte, 1000), Binary); g != "" {
		t.Errorf("zeros: guess %q", g)
	}
}
