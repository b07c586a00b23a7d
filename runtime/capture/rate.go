package capture

import (
	"fmt"
	"math"

	"tally/runtime/lab"
)

// ParseRate reads a line rate in bit/s with an optional SI prefix: 2048000, 2.048M, 155.52M,
// 10G, 2.5G, 100M, 64k, 1e9; a trailing "bit/s", "b/s" or "bps" is allowed. The rate must be
// a whole number of bits a second, at least 1.
// The syntax is tally plan's (lab.Rate).
func ParseRate(s string) (int64, error) {
	r, err := lab.Rate(s)
	if err != nil {
		return 0, fmt.Errorf("%q is not a line rate (write it like 2.048M, 155.52M, 10G or 1e9)", s)
	}
	if r < 1 || r > 1e15 {
		return 0, fmt.Errorf("%q is not a line rate between 1 bit/s and 1000 Tbit/s", s)
	}
	w := math.Round(r)
	if math.Abs(r-w) > 1e-6*math.Max(1, r) {
		return 0, fmt.Errorf("%q is not a whole number of bits a second", s)
	}
	return int64(w), nil
}
