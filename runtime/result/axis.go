package result

import (
	"fmt"
	"math"
	"strings"
)

// AxisValue writes a position on the swept axis (a crossing, its interval) as every output
// prints it: two decimals in dB, else three significant digits; "open" for no value. A value
// that rounds to zero has no sign: "-0.00" would read as a loss where there is none.
func AxisValue(v float64, unit string) string {
	if math.IsInf(v, 0) || math.IsNaN(v) {
		return "open"
	}
	if unit == "dB" || unit == "dB-Hz" {
		return unsigned(fmt.Sprintf("%.2f", v))
	}
	return unsigned(fmt.Sprintf("%.3g", v))
}

// unsigned drops the sign of a number that rounded to zero.
func unsigned(s string) string {
	if rest, ok := strings.CutPrefix(s, "-"); ok && strings.Trim(rest, "0.") == "" {
		return rest
	}
	return s
}
