package output

import (
	"bytes"
	"fmt"
	"math"
	"strings"

	"tally/runtime/result"
)

// Summary is README.md: what ran, the table, the plot, and the targets, for a code host to
// render when someone opens the folder.
func Summary(r *result.Run, files []string) []byte {
	var b bytes.Buffer
	fmt.Fprintf(&b, "# %s\n\n", r.Name)
	fmt.Fprintf(&b, "Results of `%s` (script SHA-256 `%.12s…`), seed %d, %s intervals at %g %% confidence.",
		r.Script, r.ScriptSHA256, r.Seed, r.Method, 100*r.Confidence)
	if r.Interrupted {
		b.WriteString(" **The run was interrupted**: the last point is incomplete.")
	}
	b.WriteString("\n\n")
	for _, f := range files {
		if strings.HasSuffix(f, ".png") {
			fmt.Fprintf(&b, "![%s](%s)\n\n", r.Name, f)
		}
	}
	if len(r.Targets) > 0 {
		b.WriteString("## At the target\n\n")
		for _, t := range r.Targets {
			fmt.Fprintf(&b, "- %s", targetLine(r, t))
			b.WriteString("\n")
		}
		b.WriteString("\n")
	}
	b.WriteString("## Points\n\n|")
	for _, p := range r.Params {
		fmt.Fprintf(&b, " %s |", p)
	}
	b.WriteString(" bits | errors | BER | interval | stop |")
	for _, c := range r.Theory {
		fmt.Fprintf(&b, " %s |", c)
	}
	b.WriteString("\n|")
	for range len(r.Params) + 5 + len(r.Theory) {
		b.WriteString("---|")
	}
	b.WriteString("\n")
	for _, p := range r.Points {
		b.WriteString("|")
		for i := range r.Params {
			fmt.Fprintf(&b, " %s |", r.Value(p, i))
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
				at = append(at, n+" "+r.Value(p, i))
			}
			bursty = append(bursty, fmt.Sprintf("%s (dispersion %.1f)", strings.Join(at, ", "), t.Dispersion))
		}
	}
	if len(bursty) > 0 {
		fmt.Fprintf(&b, "\nErrors came in bursts at %s. Those intervals are widened by the spread of errors between frames, since intervals for independent errors would be too narrow.\n",
			strings.Join(bursty, "; "))
	}
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
	s := fmt.Sprintf("%s = %g%s at %s = %.2f, interval [%s, %s]", t.Tap, t.Rate, where, x, t.X, end(t.Low), end(t.High))
	if t.Against != "" && t.Note == "" {
		more := "more"
		if t.Penalty < 0 {
			more = "less"
		}
		s += fmt.Sprintf("; needs %.2f dB %s than %s", math.Abs(t.Penalty), more, t.Against)
	}
	if t.GainOver != "" {
		less := "less"
		if t.Gain < 0 {
			less = "more"
		}
		s += fmt.Sprintf("; %.2f dB %s than %s", math.Abs(t.Gain), less, t.GainOver)
	}
	if t.Note != "" {
		s += " (" + t.Note + ")"
	}
	if t.Open != "" {
		s += " (" + t.Open + ")"
	}
	return s
}

// end is an end of a crossing's interval: "open" when the sweep does not close it.
func end(v float64) string {
	if math.IsInf(v, 0) || math.IsNaN(v) {
		return "open"
	}
	return fmt.Sprintf("%.2f", v)
}
