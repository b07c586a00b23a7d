package watch

import (
	"fmt"
	"math"
	"strings"

	"tally/blocks/compare"
	"tally/blocks/link"
	"tally/runtime/result"
)

// Changes says, one line per point, how the shown tap's rate (the BER, or the tap the stop
// rules judge: result.Run.ShownTaps) moved from prev to next and whether the move is
// more than chance: Fisher's exact test on the two counts (compare.Proportions), with Holm's
// correction across the points so that a sweep of twenty points does not flag one by chance
// at the 5 % level. Then the move of each target crossing (the Eb/N0 at a BER of 10⁻⁵, say).
//
// Two runs with the same seed share their random streams, so unchanged points come out with
// identical counts and changed ones are correlated; the test assumes independent samples and
// is then conservative. Errors shown to come in bursts (a tap whose interval was widened,
// "+clustered") are tested on their effective counts, errors and bits divided by the observed
// dispersion (the design effect): the adjustment of Rao and Scott, "The analysis of categorical
// data from complex sample surveys", JASA 76, 1981, and the statistic the intervals use. Without
// it a burst of decoder errors reads as hundreds of independent ones and every point is CHANGED.
func Changes(prev, next *result.Run) []string {
	type row struct {
		label string
		stop  string
		old   *result.Tap
		new   *result.Tap
		p     float64
		test  bool
	}
	// The tap the run shows (the one its stop rules judge), on both runs; else the BER.
	tap := next.ShownTaps()[0]
	ob, nb := prev.TapIndex(tap), next.TapIndex(tap)
	if ob < 0 || nb < 0 {
		tap = link.TapBER
		ob, nb = prev.TapIndex(tap), next.TapIndex(tap)
	}
	if ob < 0 || nb < 0 {
		return nil
	}
	q := tap
	if q == link.TapPre {
		q = "pre_ber"
	}
	old := map[string]*result.Tap{}
	for i := range prev.Points {
		p := &prev.Points[i]
		if ob < len(p.Taps) && sameParams(prev, next) {
			old[key(prev, *p)] = &p.Taps[ob]
		}
	}
	var rows []row
	seen := map[string]bool{}
	for i := range next.Points {
		p := &next.Points[i]
		if nb >= len(p.Taps) {
			continue
		}
		k := key(next, *p)
		seen[k] = true
		r := row{label: label(next, *p), stop: p.Stop, old: old[k], new: &p.Taps[nb]}
		// Weighted estimates (importance sampling, semi-analytic) are not counts: no Fisher test.
		if r.old != nil && r.old.Trials > 0 && r.new.Trials > 0 && !(r.old.Errors == r.new.Errors && r.old.Trials == r.new.Trials) &&
			!r.old.Weighted() && !r.new.Weighted() {
			k1, n1 := effective(r.old)
			k2, n2 := effective(r.new)
			if res, err := compare.Proportions(k1, n1, k2, n2); err == nil {
				r.p, r.test = res.P, true
			}
		}
		rows = append(rows, r)
	}
	var ps []float64
	for _, r := range rows {
		if r.test {
			ps = append(ps, r.p)
		}
	}
	alpha := 1 - next.Confidence
	if !(alpha > 0 && alpha < 1) {
		alpha = 0.05
	}
	adjusted := compare.Holm(ps)
	width := 0
	for _, r := range rows {
		width = max(width, len(r.label))
	}
	var lines []string
	j := 0
	for _, r := range rows {
		s := fmt.Sprintf("%-*s  ", width, r.label)
		switch {
		case r.new.Trials == 0:
			s += "not run this time (" + r.stop + ")"
		case r.old == nil:
			s += fmt.Sprintf("%s %.3g  (new point)", q, r.new.Rate)
		case r.old.Errors == r.new.Errors && r.old.Trials == r.new.Trials && r.old.Rate == r.new.Rate:
			s += fmt.Sprintf("%s %.3g  same counts", q, r.new.Rate)
		case !r.test:
			s += fmt.Sprintf("%s %.3g → %.3g", q, r.old.Rate, r.new.Rate)
			if r.new.Weighted() {
				s += fmt.Sprintf("  (%s, interval [%.3g, %.3g]; not tested)", r.new.Estimator, r.new.Low, r.new.High)
			}
		default:
			s += fmt.Sprintf("%s %.3g → %.3g", q, r.old.Rate, r.new.Rate)
			if r.old.Errors > 0 && r.new.Errors > 0 {
				s += fmt.Sprintf(" (×%.3g)", r.new.Rate/r.old.Rate)
			}
			if adjusted[j] <= alpha {
				s += "  CHANGED, " + pText(adjusted[j])
			} else {
				s += "  within chance, " + pText(adjusted[j])
			}
			j++
		}
		lines = append(lines, s)
	}
	same := len(rows) > 1
	for _, r := range rows {
		same = same && r.old != nil && r.old.Errors == r.new.Errors && r.old.Trials == r.new.Trials && r.old.Rate == r.new.Rate
	}
	if same {
		lines = []string{fmt.Sprintf("same counts at all %d points", len(rows))}
	}
	if len(ps) > 0 {
		counts := "the BER counts"
		if tap != link.TapBER {
			counts = "the " + q + " counts"
		}
		note := fmt.Sprintf("p: Fisher's exact test on %s, two-sided (bursty points on their effective counts, Rao–Scott); CHANGED at p ≤ %.3g", counts, alpha)
		if len(ps) > 1 {
			note += fmt.Sprintf(", Holm-adjusted over %d points", len(ps))
		}
		lines = append(lines, note)
	}
	for i := range prev.Points {
		if k := key(prev, prev.Points[i]); !seen[k] && sameParams(prev, next) {
			lines = append(lines, fmt.Sprintf("%-*s  (no longer swept)", width, label(prev, prev.Points[i])))
		}
	}
	lines = append(lines, targetChanges(prev, next)...)
	return lines
}

// targetChanges compares the swept value at each target crossing found in both runs.
func targetChanges(prev, next *result.Run) []string {
	if len(next.Params) == 0 {
		return nil
	}
	x := next.Params[0]
	unit := ""
	if strings.HasSuffix(strings.ToLower(x), "_db") {
		unit = " dB"
	}
	var lines []string
	for _, t := range next.Targets {
		var o *result.Target
		for i := range prev.Targets {
			pt := &prev.Targets[i]
			if pt.Tap == t.Tap && pt.Rate == t.Rate && pt.Curve == t.Curve {
				o = pt
			}
		}
		where := fmt.Sprintf("%s = %g", t.Tap, t.Rate)
		if t.Curve != "" {
			where += " (" + t.Curve + ")"
		}
		switch {
		case o == nil || !o.Found && !t.Found:
			continue
		case !t.Found:
			lines = append(lines, fmt.Sprintf("%s: was at %s %.2f, now not bracketed by the sweep", where, x, o.X))
		case !o.Found:
			lines = append(lines, fmt.Sprintf("%s: now at %s %.2f (was not bracketed)", where, x, t.X))
		default:
			d := t.X - o.X
			s := fmt.Sprintf("%s at %s: %.2f → %.2f (%s%s)", where, x, o.X, t.X, signed(d), unit)
			// Intervals that do not overlap say the crossing moved beyond its uncertainty.
			if t.High < o.Low || o.High < t.Low {
				s += ", beyond both intervals"
			}
			lines = append(lines, s)
		}
	}
	return lines
}

// signed is d to two decimals with its sign, and "0.00" when it rounds to zero (not −0.00).
// effective are a tap's errors and bits for a test that assumes independent bits: divided by
// the dispersion when the burst test widened its interval (Kish's effective sample size).
func effective(t *result.Tap) (errors, bits int64) {
	d := t.Dispersion
	if !strings.Contains(t.Method, "+clustered") || !(d > 1) {
		return t.Errors, t.Trials
	}
	return int64(math.Round(float64(t.Errors) / d)), max(1, int64(math.Round(float64(t.Trials)/d)))
}

// pText prints a p-value a person can read: "p = 0.003", "p = 2.3e-58", "p < 1e-300".
func pText(p float64) string {
	if p < 1e-300 {
		return "p < 1e-300"
	}
	return fmt.Sprintf("p = %.2g", p)
}

func signed(d float64) string {
	s := fmt.Sprintf("%.2f", math.Abs(d))
	if s == "0.00" {
		return s
	}
	return sign(d) + s
}

func sign(d float64) string {
	if d < 0 {
		return "−"
	}
	return "+"
}

// sameParams reports whether two runs sweep the same parameters, so points can be matched.
func sameParams(a, b *result.Run) bool {
	if len(a.Params) != len(b.Params) {
		return false
	}
	for i := range a.Params {
		if a.Params[i] != b.Params[i] {
			return false
		}
	}
	return true
}

func key(r *result.Run, p result.Point) string {
	parts := make([]string, len(r.Params))
	for i := range r.Params {
		if i < len(p.Values) {
			parts[i] = r.Value(p, i)
		}
	}
	return strings.Join(parts, "\x00")
}

func label(r *result.Run, p result.Point) string {
	parts := make([]string, len(r.Params))
	for i, n := range r.Params {
		if i < len(p.Values) {
			parts[i] = n + "=" + r.Value(p, i)
		}
	}
	return strings.Join(parts, " ")
}
