package output

import (
	"bytes"
	"fmt"
	"strings"

	"tally/runtime/result"
)

// Summary is README.md: what ran, the table, the plot, and the targets, for a code host to
// render when someone opens the folder.
func Summary(r *result.Run, files []string) []byte {
	var b bytes.Buffer
	fmt.Fprintf(&b, "# %s\n\n", md(r.Name))
	fmt.Fprintf(&b, "Results of `%s` (script SHA-256 `%.12s…`), seed %d, %s intervals at %g %% confidence.",
		r.Script, r.ScriptSHA256, r.Seed, r.Method, 100*r.Confidence)
	if Weighted(r) {
		b.WriteString(" Points estimated by importance sampling or semi-analytically use their estimator's interval (see Estimators).")
	}
	if r.Interrupted {
		b.WriteString(" **The run was interrupted**: the last point is incomplete.")
	}
	b.WriteString("\n\n")
	for _, f := range files {
		if strings.HasSuffix(f, ".png") {
			fmt.Fprintf(&b, "![%s](%s)\n\n", md(r.Name), f)
		}
	}
	if len(r.Targets) > 0 {
		b.WriteString("## At the target\n\n")
		for _, t := range r.Targets {
			fmt.Fprintf(&b, "- %s", md(targetLine(r, t)))
			b.WriteString("\n")
		}
		b.WriteString("\n")
	}
	pairedSummary(&b, r)
	if len(r.Notes) > 0 {
		b.WriteString("## Notes\n\n")
		for _, n := range r.Notes {
			fmt.Fprintf(&b, "- %s\n", n)
		}
		b.WriteString("\n")
	}
	b.WriteString("## Points\n\n|")
	for _, p := range r.Params {
		fmt.Fprintf(&b, " %s |", md(p))
	}
	b.WriteString(" bits | errors | BER | interval | stop |")
	for _, c := range r.Theory {
		fmt.Fprintf(&b, " %s |", md(c))
	}
	b.WriteString("\n|")
	for range len(r.Params) + 5 + len(r.Theory) {
		b.WriteString("---|")
	}
	b.WriteString("\n")
	for _, p := range r.Points {
		b.WriteString("|")
		for i := range r.Params {
			fmt.Fprintf(&b, " %s |", md(r.Value(p, i)))
		}
		if t := p.Taps[0]; p.Stop == skipped {
			// Nothing was counted: empty cells, not a measured 0 of 0 with the interval [0, 1].
			fmt.Fprintf(&b, " | | | | %s |", strings.TrimSuffix(skipped+": "+p.Note, ": "))
		} else {
			fmt.Fprintf(&b, " %d | %d | %s | [%s, %s] | %s |", t.Trials, t.Errors, Num(t.Rate), Num(t.Low), Num(t.High), p.Stop)
		}
		for _, v := range p.Theory {
			fmt.Fprintf(&b, " %s |", Num(v))
		}
		b.WriteString("\n")
	}
	var bursty []string
	for _, p := range r.Points {
		if t := p.Taps[0]; strings.HasSuffix(t.Method, "+clustered") {
			var at []string
			for i, n := range r.Params {
				at = append(at, md(n+" "+r.Value(p, i)))
			}
			bursty = append(bursty, fmt.Sprintf("%s (dispersion %.1f)", strings.Join(at, ", "), t.Dispersion))
		}
	}
	if len(bursty) > 0 {
		fmt.Fprintf(&b, "\nErrors came in bursts at %s. Those intervals are widened by the spread of errors between frames, since intervals for independent errors would be too narrow.\n",
			strings.Join(bursty, "; "))
	}
	estimatorSummary(&b, r)
	if len(r.Taps) > 1 {
		b.WriteString("\nOther taps (frame error rate, pre-decoder BER, the script's own counts) are in `table.csv`.\n")
	}
	b.WriteString("\nSimulated and estimated error rates do not replace conformance testing under the applicable standards and licensed practice.\n")
	return b.Bytes()
}

// skipped is the stop of a point a sweep rule did not run.
const skipped = "skipped"

func targetLine(r *result.Run, t result.Target) string {
	x := "the x axis"
	if len(r.Params) > 0 {
		x = r.Params[0]
	}
	where := ""
	if t.Curve != "" {
		where = " (" + t.Curve + ")"
	}
	if !t.Found {
		return fmt.Sprintf("%s = %g%s: not bracketed by the sweep (%s)", t.Tap, t.Rate, where, t.Note)
	}
	unit := AxisUnit(x)
	s := fmt.Sprintf("%s = %g%s at %s = %s, interval [%s, %s]", t.Tap, t.Rate, where, x,
		axisValue(t.X, unit), axisValue(t.Low, unit), axisValue(t.High, unit))
	if t.Against != "" && t.Note == "" {
		s += "; " + distance(x, t.Penalty, t.Against)
	}
	if t.GainOver != "" {
		s += "; " + distance(x, -t.Gain, t.GainOver)
	}
	if t.Note != "" {
		s += " (" + t.Note + ")"
	}
	if t.Open != "" {
		s += " (" + t.Open + ")"
	}
	return s
}
