package output

import (
	"fmt"
	"math"
	"strings"
	"tally/runtime/result"

	"tally/plots"
)

// AxisUnit is the unit of a swept parameter, read from its name as the plot's axis title
// reads it (plots.AxisLabel: ebn0_db → dB, offset_ppm → ppm, rolloff → none).
func AxisUnit(param string) string {
	l := plots.AxisLabel(param)
	if i := strings.LastIndex(l, " ("); i > 0 && strings.HasSuffix(l, ")") {
		return l[i+2 : len(l)-1]
	}
	return ""
}

// snrLike reports whether a swept parameter is a signal-to-noise axis in dB (Eb/N0, Es/N0,
// SNR, SINR, SIR, C/N0; named so and ending in _db or _dbhz): there the trade words a
// distance between curves as "needs 1.2 dB less", since more of it costs power.
func snrLike(param string) bool {
	p := strings.ToLower(param)
	if !strings.HasSuffix(p, "_db") && !strings.HasSuffix(p, "_dbhz") {
		return false
	}
	for _, s := range []string{"ebn0", "esn0", "snr", "sinr", "sir", "cn0"} {
		if strings.HasPrefix(p, s) {
			return true
		}
	}
	return false
}

// amount writes a distance along the axis with its unit: "0.42 dB", "3 ppm", "0.031" (no
// unit: a parameter named without one). dB keeps two decimals, as the trade quotes them;
// other units three significant digits.
func amount(v float64, unit string) string {
	v = math.Abs(v)
	if unit == "dB" || unit == "dB-Hz" {
		return fmt.Sprintf("%.2f %s", v, unit)
	}
	s := fmt.Sprintf("%.3g", v)
	if unit == "" {
		return s
	}
	if unit == "°" {
		return s + unit
	}
	return s + " " + unit
}

// axisValue is a value of the swept axis as the outputs print it (result.AxisValue).
func axisValue(v float64, unit string) string { return result.AxisValue(v, unit) }

// distance words how far this curve's crossing lies from another's (than): d is this
// crossing minus the other along the axis. On a signal-to-noise axis: "needs 0.42 dB more
// than coherent"; on any other axis: "at a higher offset than coherent (by 0.031)", since
// there more or less is not by itself better or worse.
func distance(param string, d float64, than string) string {
	unit := AxisUnit(param)
	if snrLike(param) {
		if math.Abs(d) < 0.005 && (unit == "dB" || unit == "dB-Hz") {
			return fmt.Sprintf("the same as %s (within 0.01 %s)", than, unit)
		}
		more := "more"
		if d < 0 {
			more = "less"
		}
		return fmt.Sprintf("needs %s %s than %s", amount(d, unit), more, than)
	}
	if d == 0 || strings.Trim(amount(d, unit), "0. ") == unit {
		return fmt.Sprintf("at the same %s as %s", param, than) // nothing left after rounding
	}
	higher := "higher"
	if d < 0 {
		higher = "lower"
	}
	return fmt.Sprintf("at a %s %s than %s (by %s)", higher, param, than, amount(d, unit))
}
