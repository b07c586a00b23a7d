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

// percent writes a confidence as a percentage with four digits, more when those would
// round it to 100 or 0: 95 %, 99.9 %, 63.21 %, 99.99999 %.
func percent(c float64) string {
	p := c * 100
	s := strconv.FormatFloat(p, 'g', 4, 64)
	for prec := 5; (s == "100" || s == "0") && prec <= 17; prec++ {
		s = strconv.FormatFloat(p, 'g', prec, 64)
	}
	return s + " %"
}

// duration writes seconds the way a person says them: 40 ms, 12 s, 5 min 2 s, 3 h 20 min,
// 4.2 days, 31 years.
func duration(s float64) string {
	const (
		minute = 60.0
		hour   = 60 * minute
		day    = 24 * hour
		year   = 365.25 * day
	)
	switch {
	case s < 1e-6:
		return fmt.Sprintf("%.3g ns", s*1e9)
	case s < 1e-3:
		return fmt.Sprintf("%.3g µs", s*1e6)
	case s < 1:
		return fmt.Sprintf("%.3g ms", s*1e3)
	case s < minute:
		return fmt.Sprintf("%.3g s", s)
	case s < hour:
		m := math.Floor(s / minute)
		return fmt.Sprintf("%.0f min %.0f s", m, math.Floor(s-m*minute))
	case s < day:
		h := math.Floor(s / hour)
		return fmt.Sprintf("%.0f h %.0f min", h, math.Floor((s-h*hour)/minute))
	case s < year:
		return fmt.Sprintf("%.3g days", s/day)
	}
	return fmt.Sprintf("%.3g years", s/year)
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
