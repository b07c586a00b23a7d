package capture

import (
	"bytes"
	"errors"
	"math/rand/v2"
	"testing"
)

// Random captures built from pattern stretches, slips, garbage and errors, of any length,
// never panic, and every bit is accounted for once: compared + lost + before the first lock
// = capture bits, with errors among the compared bits. (Bookkeeping, common practice.)
func TestRandomCapturesAccountForEveryBit(t *testing.T) {
	r := rand.New(rand.NewPCG(11, 12))
	base := prbsBits(t, 11, 60_000, false)
	for trial := range 300 {
		var b []byte
		pos := r.IntN(1000)
		for len(b) < 1000+r.IntN(20_000) && pos < len(base)-2000 {
			switch r.IntN(6) {
			case 0:
				b = append(b, randomRef(r.IntN(3000), uint64(trial))...)
			case 1:
				pos += r.IntN(5) // dropped bits
			case 2:
				pos -= min(pos, r.IntN(3)) // repeated bits
			default:
				k := r.IntN(2000)
				b = append(b, base[pos:pos+k]...)
				pos += k
			}
		}
		randomErrors(b, []float64{0, 1e-3, 3e-2, 0.2}[r.IntN(4)], uint64(trial))
		var data []byte
		f := Format(r.IntN(3))
		lsb := r.IntN(2) == 0
		switch f {
		case Binary:
			data = pack(b, lsb)
		case ASCII:
			data = asASCII(b)
		case Hex:
			data = asHex(b, lsb)
		}
		o := Options{PRBS: 11, Format: f, LSB: lsb, Interval: int64(1 + r.IntN(5000))}
		if r.IntN(2) == 0 {
			o.Rate, o.Block = 1000, 100
		}
		c, err := Count(bytes.NewReader(data), o)
		if err != nil {
			if !errors.Is(err, ErrNoLock) && !errors.Is(err, ErrEmpty) {
				t.Errorf("trial %d: %v", trial, err)
			}
			continue
		}
		if c.Compared+c.Lost+c.Before != c.Bits || c.Errors > c.Compared || c.Compared < 0 {
			t.Errorf("trial %d: bits %d = compared %d + lost %d + before %d? errors %d", trial, c.Bits, c.Compared, c.Lost, c.Before, c.Errors)
		}
		var rowBits, rowErr int64
		for _, w := range c.Rows {
			rowBits += w.Bits()
			rowErr += w.Errors
		}
		if rowBits != c.Compared || rowErr != c.Errors {
			t.Errorf("trial %d: rows hold %d bits %d errors, totals %d %d", trial, rowBits, rowErr, c.Compared, c.Errors)
		}
	}
}
