package capture

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// ParseRate reads a line rate in bit/s with an optional SI prefix: 2048000, 2.048M, 155.52M,
// 10G, 2.5G, 100M, 64k, 1e9; a trailing "bit/s", "b/s" or "bps" is allowed. The rate must be
// a whole number of bits a second, at least 1.
//
// tally plan is gaining the same syntax for its -rate; the two parsers should become one.
func ParseRate(s string) (int64, error) {
	t := strings.TrimSpace(s)
	for _, unit := range []string{"bit/s", "b/s", "bps"} {
		if len(t) > len(unit) && strings.EqualFold(t[len(t)-len(unit):], unit) {
			t = strings.TrimSpace(t[:len(t)-len(unit)])
			break
		}
	}
	scale := 1.0
	if t != "" {
		switch t[len(t)-1] {
		case 'k', 'K':
			scale = 1e3
		case 'M':
			scale = 1e6
		case 'G':
			scale = 1e9
		case 'T':
			scale = 1e12
		}
		if scale != 1 {
			t = t[:len(t)-1]
		}
	}
	v, err := strconv.ParseFloat(strings.TrimSpace(t), 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, fmt.Errorf("%q is not a line rate (write it like 2.048M, 155.52M, 10G or 1e9)", s)
	}
	r := v * scale
	if r < 1 || r > 1e15 {
		return 0, fmt.Errorf("%q is not a line rate between 1 bit/s and 1000 Tbit/s", s)
	}
	w := math.Round(r)
	if math.Abs(r-w) > 1e-6*math.Max(1, r) {
		return 0, fmt.Errorf("%q is not a whole number of bits a second", s)
	}
	return int64(w), nil
}
