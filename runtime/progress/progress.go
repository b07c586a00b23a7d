// Package progress shows how a run is going. On a terminal each running point gets a live
// line, redrawn a few times a second in place:
//
//	[3/6] ebn0_db=4  errors 57/100  bits 1.23M/10M  ber 4.63e-05 [3.51e-05, 6e-05]  38.1 Mbit/s  ~2.1 s left
//
// and every finished point leaves one plain line, which is all a log file or a pipe gets.
package progress

import (
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"strings"
	"time"
	"unicode/utf8"

	"tally/blocks/link"
	"tally/blocks/stats"
	"tally/blocks/stop"
	"tally/runtime/result"
)

// Every is how often a live line is redrawn: often enough to look alive, rarely enough to cost
// nothing next to the frames.
const Every = 200 * time.Millisecond

// Terminal reports whether w is a terminal (a character device), where live lines make sense.
func Terminal(w io.Writer) bool {
	f, ok := w.(*os.File)
	if !ok {
		return false
	}
	st, err := f.Stat()
	return err == nil && st.Mode()&os.ModeCharDevice != 0
}

// Point is what a live line needs to know about the point it shows.
type Point struct {
	Label        string      // parameter values, "ebn0_db=4 code=1/2"
	Index, Total int         // 0-based position and number of points in the run
	Rules        []stop.Rule // the point's stop rules, for the goal and the time left
	Confidence   float64     // interval level (0.95 if zero)
	Method       string      // interval method (stats.MethodNamed; "" is the default)
	// Tap is the tap the line counts: the governing one, whose rules end the point (a
	// script's "payload" tap when its error count does); "" is the BER tap.
	Tap string
	// Custom says the point's link has a block of the script's own (engine.HasCustom), which
	// an interpreted run computes in the interpreter: what makes handing it over worth it.
	Custom bool
}

// tap is the tap the line counts.
func (p Point) tap() string {
	if p.Tap == "" {
		return link.TapBER
	}
	return p.Tap
}

// Line is the live line of one running point on a terminal.
type Line struct {
	w     io.Writer
	p     Point
	width int
	shown bool
}

// NewLine starts the live line of a point on w, a terminal.
func NewLine(w io.Writer, p Point) *Line {
	return &Line{w: w, p: p, width: width(w)}
}

// width is the terminal's width (asked of the terminal, else $COLUMNS, else 80); the line is
// cut to fit, since a line that wraps cannot be redrawn in place.
func width(w io.Writer) int {
	if n := termWidth(w); n >= 20 {
		return n
	}
	if n, err := strconv.Atoi(os.Getenv("COLUMNS")); err == nil && n >= 20 {
		return n
	}
	return 80
}

// Update redraws the line from the committed prefix (the Progress of an engine.Observer).
func (l *Line) Update(pr *stop.Progress) {
	s := Live(l.p, pr)
	if n := l.width - 1; utf8.RuneCountInString(s) > n {
		s = string([]rune(s)[:n-1]) + "…"
	}
	fmt.Fprintf(l.w, "\r%s\x1b[K", s)
	l.shown = true
}

// Close erases the line, so that the point's finished line (or an error) takes its place.
func (l *Line) Close() {
	if l.shown {
		fmt.Fprint(l.w, "\r\x1b[K")
		l.shown = false
	}
}

// Live is the text of a live line: the point, errors against the goal, bits against the cap,
// the BER and its interval so far, the throughput and the time left. Off the BER tap (a
// governing tap of the script's own) the errors, trials and estimate are that tap's:
//
//	[3/6] ebn0_db=4  payload errors 57/100 of 1.23M  bits 1.5M/10M  payload 4.63e-05 [3.51e-05, 6e-05]  …
func Live(p Point, pr *stop.Progress) string {
	var b strings.Builder
	fmt.Fprintf(&b, "[%d/%d] %s ", p.Index+1, p.Total, p.Label)
	if pr.Frames == 0 {
		// Told as the point starts: a link with blocks of the script's own first has them
		// checked on a few frames (engine.checkInstances).
		b.WriteString(" starting")
		return b.String()
	}
	name := p.tap()
	ber, _ := pr.Tap(link.TapBER)
	t, ok := pr.Tap(name)
	if !ok {
		name, t = link.TapBER, ber
	}
	goal, bitCap := goals(p.Rules, name)
	if name == link.TapBER {
		fmt.Fprintf(&b, " errors %d", t.Errors)
	} else {
		fmt.Fprintf(&b, " %s errors %d", name, t.Errors)
	}
	if goal > 0 {
		fmt.Fprintf(&b, "/%d", goal)
	}
	if name != link.TapBER {
		fmt.Fprintf(&b, " of %s", SI(float64(t.Trials)))
	}
	fmt.Fprintf(&b, "  bits %s", SI(float64(ber.Trials)))
	if bitCap > 0 {
		fmt.Fprintf(&b, "/%s", SI(float64(bitCap)))
	}
	conf := p.Confidence
	if conf == 0 {
		conf = 0.95
	}
	if t.Trials > 0 && t.Estimator != link.Count {
		// Importance sampling or semi-analytic: the weighted estimate so far.
		if e, err := stats.Weighted(t, conf); err == nil {
			fmt.Fprintf(&b, "  %s %.3g [%.3g, %.3g] %s", name, e.Rate, e.Low, e.High, t.Estimator)
		}
	} else if t.Trials > 0 {
		// The fixed-n interval of the prefix: a gauge while running; the finished point gets
		// the interval valid for the rule that ended it.
		if e, err := stats.Interval(p.Method, t.Errors, t.Trials, conf); err == nil {
			fmt.Fprintf(&b, "  %s %.3g [%.3g, %.3g]", name, e.Rate, e.Low, e.High)
		}
	}
	if sec := pr.Elapsed.Seconds(); sec > 0 {
		fmt.Fprintf(&b, "  %.1f Mbit/s", float64(ber.Trials)/sec/1e6)
	}
	if left, ok := Left(p.Rules, pr); ok {
		fmt.Fprintf(&b, "  ~%s left", Duration(left))
	}
	return b.String()
}

// Goals are the error count and bit cap the rules ask for on the BER tap (0: none), what a
// progress bar fills toward.
func Goals(rules []stop.Rule) (errs, bits int64) { return goals(rules, link.TapBER) }

// GoalsOn is Goals with the error count asked for on the named tap (the governing one).
func GoalsOn(rules []stop.Rule, tap string) (errs, bits int64) {
	if tap == "" {
		tap = link.TapBER
	}
	return goals(rules, tap)
}

// goals are the error count on tap and the bit cap the rules ask for (0: none).
func goals(rules []stop.Rule, tap string) (errs, bits int64) {
	for _, r := range rules {
		switch r := r.(type) {
		case *stop.ErrorTarget:
			on := r.On
			if on == "" {
				on = link.TapBER
			}
			if on == tap && (errs == 0 || r.Count < errs) {
				errs = r.Count
			}
		case *stop.BitCap:
			if bits == 0 || r.Max < bits {
				bits = r.Max
			}
		case *stop.AllOf: // its error count is a goal the point must reach
			if e, _ := goals(r.Rules, tap); e > 0 && (errs == 0 || e < errs) {
				errs = e
			}
		}
	}
	return errs, bits
}

// Left estimates the time until the first rule is met, from the rates seen so far: errors
// still wanted over errors per second, bits or frames still wanted over bits or frames per
// second, or what is left of a time budget; for All, the longest of its rules' times. Rules
// it cannot project (interval rules) are left out; false when none can be.
func Left(rules []stop.Rule, pr *stop.Progress) (time.Duration, bool) {
	sec := pr.Elapsed.Seconds()
	if sec <= 0 {
		return 0, false
	}
	best := math.Inf(1)
	for _, r := range rules {
		if s, ok := left(r, pr, sec); ok {
			best = math.Min(best, s)
		}
	}
	if math.IsInf(best, 1) {
		return 0, false
	}
	return time.Duration(best * float64(time.Second)), true
}

// left is the seconds until r is met, and false when r cannot be projected.
func left(r stop.Rule, pr *stop.Progress, sec float64) (float64, bool) {
	var done, want float64
	switch r := r.(type) {
	case *stop.ErrorTarget:
		on := r.On
		if on == "" {
			on = link.TapBER
		}
		t, _ := pr.Tap(on)
		done, want = float64(t.Errors), float64(r.Count)
		if t.Estimator != link.Count {
			// A weighted tap meets the rule at the precision of Count errors, which grows
			// about in proportion to the frames run.
			done = math.Min(stats.EquivalentErrors(t), 1e300)
		}
	case *stop.BitCap:
		t, _ := pr.Tap(link.TapBER)
		done, want = float64(t.Trials), float64(r.Max)
	case *stop.FrameCount:
		done, want = float64(pr.Frames), float64(r.Min)
	case *stop.TimeLimit:
		done, want = sec, r.Max.Seconds()
	case *stop.AllOf:
		most := 0.0
		for _, m := range r.Rules {
			s, ok := left(m, pr, sec)
			if !ok {
				return 0, false
			}
			most = math.Max(most, s)
		}
		return most, len(r.Rules) > 0
	default:
		return 0, false
	}
	if done <= 0 {
		return 0, false
	}
	return math.Max(0, want-done) * sec / done, true
}

// Finished is the line a finished point leaves: the point, its BER tap's count, estimate and
// interval, why it stopped, and the throughput.
func Finished(label string, rp result.Point) string { return FinishedOn(label, rp, link.TapBER) }

// FinishedOn is Finished on the named tap (the governing one), with the BER beside it when
// that is another tap:
//
//	ebn0_db=6  payload_trials=917504 payload_errors=5 payload=5.45e-06 [1.77e-06, 1.27e-05] ber=0.00172 stop=payload_errors  …
func FinishedOn(label string, rp result.Point, tap string) string {
	var b strings.Builder
	b.WriteString(label)
	k := -1
	for i, t := range rp.Taps {
		if t.Name == tap && !t.Absent {
			k = i
		}
	}
	if k < 0 && len(rp.Taps) > 0 {
		k = 0
	}
	if k >= 0 {
		t := rp.Taps[k]
		if t.Name == link.TapBER || t.Name == "" {
			fmt.Fprintf(&b, "  bits=%d errors=%d ber=%.3g [%.3g, %.3g]", t.Trials, t.Errors, t.Rate, t.Low, t.High)
		} else {
			q := t.Name
			if q == link.TapPre {
				q = "pre_ber"
			}
			fmt.Fprintf(&b, "  %s_trials=%d %s_errors=%d %s=%.3g [%.3g, %.3g]", q, t.Trials, q, t.Errors, q, t.Rate, t.Low, t.High)
		}
		if t.Weighted() {
			fmt.Fprintf(&b, " %s", t.Estimator)
			if t.Degenerate {
				b.WriteString(" (weights degenerated)")
			}
		}
		if ber := rp.Taps[0]; t.Name != ber.Name && ber.Name == link.TapBER && !ber.Absent {
			fmt.Fprintf(&b, " ber=%.3g", rp.Taps[0].Rate)
		}
	}
	fmt.Fprintf(&b, " stop=%s  %.1f Mbit/s  %s", rp.Stop, rp.BitRate/1e6, Duration(time.Duration(rp.Seconds*float64(time.Second))))
	return b.String()
}

// SI writes a count with a metric prefix: 950, 12.3k, 4.56M, 1G.
func SI(v float64) string {
	for _, u := range []struct {
		div float64
		sym string
	}{{1e12, "T"}, {1e9, "G"}, {1e6, "M"}, {1e3, "k"}} {
		if math.Abs(v) >= u.div {
			return strconv.FormatFloat(v/u.div, 'g', 3, 64) + u.sym
		}
	}
	return strconv.FormatFloat(v, 'g', 3, 64)
}

// Duration writes a time to the precision a person wants to read: 40 ms, 2.5 s, 12 s, 3 min 5 s,
// 2 h 10 min.
func Duration(d time.Duration) string {
	s := d.Seconds()
	switch {
	case s < 1:
		return strconv.Itoa(int(math.Round(s*1000))) + " ms"
	case s < 10:
		return strconv.FormatFloat(s, 'f', 1, 64) + " s"
	case s < 120:
		return strconv.FormatFloat(s, 'f', 0, 64) + " s"
	case s < 7200:
		m := int(s) / 60
		return fmt.Sprintf("%d min %d s", m, int(s)-60*m)
	default:
		h := int(s) / 3600
		return fmt.Sprintf("%d h %d min", h, (int(s)-3600*h)/60)
	}
}
