package watch

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"tally/blocks/compare"
	"tally/blocks/link"
	"tally/blocks/stats"
	"tally/runtime/framelog"
	"tally/runtime/result"
)

// row is one point of a what-changed report.
type row struct {
	label  string
	stop   string
	oldP   *result.Point
	newP   *result.Point
	old    *result.Tap
	new    *result.Tap
	p      float64
	test   string // "paired" or "fisher"; "" untested
	frames int64  // frames compared (paired)
	same   bool   // same link: same frames
	equal  bool   // same errors in every frame compared (paired)
	few    bool   // too few frames in common to judge (paired)
}

// Changes says how each point moved from prev to next and whether the move is more than
// chance, then how each target crossing moved (the Eb/N0 at a BER of 10⁻⁵, say).
//
// Two runs with the same seed draw the same random numbers for the same point and frame
// (streams keyed by seed, point, frame and block), so they are already paired:
//
//   - A point whose link fingerprint is the same in both runs (the same build, seed, point and
//     link, every block with its parameters; see result.Point) computed the same counts for
//     every frame by construction: "same frames", no test, even when its stop rules changed
//     and it ran more or fewer frames. These points, and those whose frames were replayed
//     rather than computed (reused), are summed up in one line.
//   - A point whose link changed is compared frame by frame over the frames both runs
//     committed (stats.ComparePaired: paired frame-level differences, valid under any stop
//     rule and however errors cluster within a frame), on the BER tap. A point whose errors
//     were the same in every one of those frames is summed up with the unchanged ones.
//   - When the earlier run kept no per-frame counts (a results folder from before frames.gz),
//     the totals are compared instead: Fisher's exact test (compare.Proportions), errors shown
//     to come in bursts (an interval widened "+clustered") on their effective counts, errors
//     and bits divided by the observed dispersion (the design effect: Rao and Scott, "The
//     analysis of categorical data from complex sample surveys", JASA 76, 1981). The test then
//     treats the runs as independent, which they are not: it is conservative.
//
// The p-values of all points tested are adjusted together by Holm's method, so that a sweep
// of twenty points does not flag one by chance; a point is CHANGED when its adjusted p is at
// most α = 1 − the run's confidence. Each changed point gets one line naming its test.
func Changes(prev, next *result.Run) []string {
	// The tap the run shows (the one its stop rules judge: result.Run.ShownTaps), on both
	// runs; else the BER.
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
	old := map[string]*result.Point{}
	for i := range prev.Points {
		p := &prev.Points[i]
		if ob < len(p.Taps) && sameParams(prev, next) {
			old[key(prev, *p)] = p
		}
	}
	confidence := next.Confidence
	if !(confidence > 0 && confidence < 1) {
		confidence = 0.95
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
		r := row{label: label(next, *p), stop: p.Stop, newP: p, new: &p.Taps[nb]}
		if o := old[k]; o != nil {
			r.oldP, r.old = o, &o.Taps[ob]
		}
		switch {
		case r.old == nil || r.new.Trials == 0 || r.old.Trials == 0:
		case p.LinkFingerprint != "" && p.LinkFingerprint == r.oldP.LinkFingerprint:
			r.same = true
		case r.old.Weighted() || r.new.Weighted():
			// Weighted estimates (importance sampling, semi-analytic) are not counts: no test.
		case paired(r.oldP, p, ob, nb):
			t := pairTally(r.oldP.Log, p.Log, logTap(r.oldP, ob), logTap(p, nb))
			c := stats.ComparePaired(t, confidence)
			r.frames, r.equal = t.Frames, c.Same
			switch {
			case c.Same, math.IsNaN(c.P):
			case t.Frames < stats.MinPairedFrames && !c.Shown:
				r.few = true // nothing judged: not a test for Holm's count either
			default:
				r.p, r.test = c.P, "paired"
			}
		case r.old.Errors == r.new.Errors && r.old.Trials == r.new.Trials:
		default:
			k1, n1 := effective(r.old)
			k2, n2 := effective(r.new)
			if res, err := compare.Proportions(k1, n1, k2, n2); err == nil {
				r.p, r.test = res.P, "fisher"
			}
		}
		rows = append(rows, r)
	}
	var ps []float64
	for _, r := range rows {
		if r.test != "" {
			ps = append(ps, r.p)
		}
	}
	alpha := 1 - confidence
	adjusted := compare.Holm(ps)
	width := 0
	for _, r := range rows {
		width = max(width, len(r.label))
	}
	var lines []string
	var same, equal, sameCounts, reused, ranOn []row
	tests := map[string]int{}
	j := 0
	for _, r := range rows {
		s := fmt.Sprintf("%-*s  ", width, r.label)
		switch {
		case r.new.Trials == 0:
			s += "not run this time (" + r.stop + ")"
		case r.old == nil:
			s += fmt.Sprintf("%s %.3g  (new point)", q, r.new.Rate)
		case r.same:
			same = append(same, r)
			switch n := r.newP.FramesReused; {
			case n > 0 && n == r.newP.Frames:
				reused = append(reused, r)
			case n > 0:
				ranOn = append(ranOn, r)
			}
			continue
		case r.equal:
			equal = append(equal, r)
			continue
		case r.test == "" && r.old.Errors == r.new.Errors && r.old.Trials == r.new.Trials && r.old.Rate == r.new.Rate:
			sameCounts = append(sameCounts, r)
			continue
		case r.test == "":
			s += fmt.Sprintf("%s %.3g → %.3g", q, r.old.Rate, r.new.Rate)
			if r.few {
				s += fmt.Sprintf("  not judged: %s in common, the paired test needs %d", frames(r.frames), stats.MinPairedFrames)
			}
			if r.new.Weighted() {
				s += fmt.Sprintf("  (%s, interval [%.3g, %.3g]; not tested)", r.new.Estimator, r.new.Low, r.new.High)
			}
		default:
			s += fmt.Sprintf("%s %.3g → %.3g", q, r.old.Rate, r.new.Rate)
			if r.old.Errors > 0 && r.new.Errors > 0 {
				s += fmt.Sprintf(" (×%.3g)", r.new.Rate/r.old.Rate)
			}
			if adjusted[j] <= alpha {
				s += "  CHANGED, " + stats.FormatP(adjusted[j])
			} else {
				s += "  within chance, " + stats.FormatP(adjusted[j])
			}
			if r.test == "paired" {
				s += " (paired, " + frames(r.frames) + ")"
			} else {
				s += " (Fisher on totals)"
			}
			tests[r.test]++
			j++
		}
		lines = append(lines, s)
	}
	var summary []string
	if len(same) > 0 {
		s := fmt.Sprintf("%s: same link and seed, so the same frames (not tested)", count(len(same), len(rows)))
		if n := rulesChanged(same); n > 0 {
			s += fmt.Sprintf("; %s with new stop rules", count(n, len(same)))
		}
		summary = append(summary, s)
	}
	if len(equal) > 0 {
		summary = append(summary, fmt.Sprintf("%s: the same number of errors in every frame both runs counted (fingerprint changed: an edit of the script's own code, of another variant in a paired comparison, or another tally build)", count(len(equal), len(rows))))
	}
	if len(sameCounts) > 0 {
		summary = append(summary, fmt.Sprintf("%s: same counts", count(len(sameCounts), len(rows))))
	}
	if len(reused) > 0 {
		summary = append(summary, "reused (the last run's frames replayed, none computed): "+curves(next, reused))
	}
	if len(ranOn) > 0 {
		summary = append(summary, "ran on from the last run's frames (replayed, then computed as the new rules asked): "+curves(next, ranOn))
	}
	lines = append(summary, lines...)
	if len(ps) > 0 {
		var how []string
		if tests["paired"] > 0 {
			how = append(how, "paired: the two runs frame by frame over the frames both counted (same seed, same random numbers), "+
				"frame-level differences, valid under any stop rule (Waudby-Smith et al. 2024)")
		}
		if tests["fisher"] > 0 {
			how = append(how, "Fisher on totals: where a run kept no per-frame counts (an older results folder), the totals are compared by Fisher's exact test "+
				"(bursty points on their effective counts, Rao–Scott 1981)")
		}
		on := ""
		if tap != link.TapBER {
			on = " on the " + q + " counts"
		}
		note := "p" + on + ": " + strings.Join(how, "; ") + "; CHANGED at α = " + strconv.FormatFloat(alpha, 'g', 3, 64)
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

// frames is "1 frame", "40 frames".
func frames(n int64) string {
	if n == 1 {
		return "1 frame"
	}
	return fmt.Sprintf("%d frames", n)
}

// count is "all 6 points", "1 point", "4 points".
func count(n, of int) string {
	switch {
	case n == of && n > 1:
		return fmt.Sprintf("all %d points", n)
	case n == 1:
		return "1 point"
	}
	return fmt.Sprintf("%d points", n)
}

// rulesChanged counts the rows whose stop rules' fingerprint changed.
func rulesChanged(rows []row) int {
	n := 0
	for _, r := range rows {
		if r.oldP.RulesFingerprint != r.newP.RulesFingerprint {
			n++
		}
	}
	return n
}

// curves names the points of rows by curve: "modem=BPSK all 11, modem=QPSK 3 of 11" (a curve
// is the points sharing the values of every parameter but the first), "4 of 11 points" for a
// sweep of one parameter.
func curves(run *result.Run, rows []row) string {
	type curve struct {
		name     string
		got, all int
	}
	var cs []*curve
	by := map[string]*curve{}
	name := func(p result.Point) string {
		parts := make([]string, 0, len(run.Params))
		for i := 1; i < len(run.Params) && i < len(p.Values); i++ {
			parts = append(parts, run.Params[i]+"="+run.Value(p, i))
		}
		return strings.Join(parts, " ")
	}
	for _, p := range run.Points {
		n := name(p)
		if by[n] == nil {
			by[n] = &curve{name: n}
			cs = append(cs, by[n])
		}
		by[n].all++
	}
	for _, r := range rows {
		by[name(*r.newP)].got++
	}
	if len(rows) == len(run.Points) {
		return count(len(rows), len(rows))
	}
	var out []string
	for _, c := range cs {
		switch {
		case c.got == 0:
		case c.name == "":
			out = append(out, fmt.Sprintf("%d of %d points", c.got, c.all))
		case c.got == c.all:
			out = append(out, fmt.Sprintf("%s all %d", c.name, c.all))
		default:
			out = append(out, fmt.Sprintf("%s %d of %d", c.name, c.got, c.all))
		}
	}
	return strings.Join(out, ", ")
}

// paired reports whether two points kept their per-frame counts of the compared tap (index ta
// of a's taps, tb of b's), so they can be compared frame by frame.
func paired(a, b *result.Point, ta, tb int) bool {
	return a.Log.Usable() && b.Log.Usable() && a.Log.Frames == a.Frames && b.Log.Frames == b.Frames &&
		logTap(a, ta) >= 0 && logTap(b, tb) >= 0
}

// logTap is the index in p's per-frame log of the point's tap k: the log holds the taps the
// point's link counts (not those marked absent), in order. It is -1 unless the log's sums of
// that tap agree with the point's totals, so a frame-by-frame comparison never reads another
// tap's counts.
func logTap(p *result.Point, k int) int {
	if p.Log == nil || k < 0 || k >= len(p.Taps) || p.Taps[k].Absent {
		return -1
	}
	i := 0
	for _, t := range p.Taps[:k] {
		if !t.Absent {
			i++
		}
	}
	if i >= p.Log.Taps {
		return -1
	}
	sum := p.Log.Sum(p.Log.Frames)
	if i >= len(sum) || sum[i].Trials != p.Taps[k].Trials || sum[i].Errors != p.Taps[k].Errors {
		return -1
	}
	return i
}

// pairTally sums tap ia of log a and tap ib of log b over the frames both logs hold, frame by
// frame.
func pairTally(a, b *framelog.Log, ia, ib int) stats.PairedTally {
	var t stats.PairedTally
	framelog.Pair(a, b, min(a.Frames, b.Frames), func(m int64, ca, cb []int64) {
		ca, cb = ca[2*ia:2*ia+2], cb[2*ib:2*ib+2]
		ea, eb := float64(ca[1]), float64(cb[1])
		t.Merge(stats.PairedTally{Frames: m, TrialsA: m * ca[0], TrialsB: m * cb[0], ErrorsA: m * ca[1], ErrorsB: m * cb[1],
			SquaresA: float64(m) * ea * ea, SquaresB: float64(m) * eb * eb, Cross: float64(m) * ea * eb})
	})
	return t
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
