package lab

import (
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
)

// grouped writes a whole number with thin groups of three digits: 2 995 732 273 554.
func grouped(n int64) string {
	s := strconv.FormatInt(n, 10)
	var b strings.Builder
	for i, r := range s {
		if i > 0 && (len(s)-i)%3 == 0 {
			b.WriteByte(' ')
		}
		b.WriteRune(r)
	}
	return b.String()
}

// Percent writes a confidence as a percentage with four digits, more when those would
// round it to 100 or 0: 95 %, 99.9 %, 63.21 %, 99.99999 %.
func Percent(c float64) string {
	p := c * 100
	s := strconv.FormatFloat(p, 'g', 4, 64)
	for prec := 5; (s == "100" || s == "0") && prec <= 17; prec++ {
		s = strconv.FormatFloat(p, 'g', prec, 64)
	}
	return s + " %"
}

// duration writes seconds the way a person says them, rounded up (a test time must not be
// shown shorter than it is): 40 ms, 12 s, 5 min 0 s, 3 h 20 min, 4.21 days, 31 years.
func duration(s float64) string {
	const (
		minute = 60.0
		hour   = 60 * minute
		day    = 24 * hour
		year   = 365.25 * day
	)
	switch {
	case s < 1e-6:
		return ceilSig(s*1e9, 3) + " ns"
	case s < 1e-3:
		return ceilSig(s*1e6, 3) + " µs"
	case s < 1:
		return ceilSig(s*1e3, 3) + " ms"
	case s < minute:
		return ceilSig(s, 3) + " s"
	case s < hour:
		t := math.Ceil(s)
		m := math.Floor(t / minute)
		return fmt.Sprintf("%.0f min %.0f s", m, t-m*minute)
	case s < day:
		t := math.Ceil(s / minute)
		h := math.Floor(t / 60)
		return fmt.Sprintf("%.0f h %.0f min", h, t-h*60)
	case s < year:
		return ceilSig(s/day, 3) + " days"
	}
	return ceilSig(s/year, 3) + " years"
}

// ceilSig writes v > 0 rounded up to sig significant digits: ceilSig(4.991, 3) = "5",
// ceilSig(299.57, 3) = "300".
func ceilSig(v float64, sig int) string {
	if !(v > 0) || math.IsInf(v, 0) {
		return strconv.FormatFloat(v, 'g', sig, 64)
	}
	e := math.Floor(math.Log10(v)) - float64(sig-1)
	scale := math.Pow(10, e)
	u := math.Ceil(v/scale*(1-1e-12)) * scale // (1−1e-12): a value already on the grid stays
	return strconv.FormatFloat(u, 'g', sig, 64)
}

// lineRate writes bits per second in the trade's units: 10 Gbit/s, 2.5 Mbit/s.
func lineRate(r float64) string {
	for _, u := range []struct {
		scale float64
		name  string
	}{{1e12, "Tbit/s"}, {1e9, "Gbit/s"}, {1e6, "Mbit/s"}, {1e3, "kbit/s"}} {
		if r >= u.scale {
			return strconv.FormatFloat(r/u.scale, 'g', 4, 64) + " " + u.name
		}
	}
	return strconv.FormatFloat(r, 'g', 4, 64) + " bit/s"
}

func fprintf(w io.Writer, format string, a ...any) { fmt.Fprintf(w, format, a...) }

func formatG(v float64) string { return strconv.FormatFloat(v, 'g', 4, 64) }

// capital upper-cases the first letter.
func capital(s string) string {
	if s == "" {
		return s
	}
	return strings.ToUpper(s[:1]) + s[1:]
}
