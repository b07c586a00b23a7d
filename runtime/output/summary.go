package output

import (
	"bytes"
	"fmt"
	"slices"
	"strings"

	"tally/blocks/link"
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
	shown := r.ShownTaps()
	b.WriteString("## Points\n\n|")
	for _, p := range r.Params {
		fmt.Fprintf(&b, " %s |", md(p))
	}
	for _, tap := range shown {
		b.WriteString(tapHeads(tap, len(shown) > 1))
	}
	b.WriteString(" stop |")
	for _, c := range r.Theory {
		fmt.Fprintf(&b, " %s |", md(c))
	}
	b.WriteString("\n|")
	for range len(r.Params) + 4*len(shown) + 1 + len(r.Theory) {
		b.WriteString("---|")
	}
	b.WriteString("\n")
	for _, p := range r.Points {
		b.WriteString("|")
		for i := range r.Params {
			fmt.Fprintf(&b, " %s |", md(r.Value(p, i)))
		}
		for _, tap := range shown {
			k := r.TapIndex(tap)
			if t := p.Taps[k]; p.Stop == skipped || t.Absent {
				// Nothing was counted: empty cells, not a measured 0 of 0 with the interval [0, 1].
				b.WriteString(" | | | |")
			} else {
				fmt.Fprintf(&b, " %d | %d | %s | [%s, %s] |", t.Trials, t.Errors, Num(t.Rate), Num(t.Low), Num(t.High))
			}
		}
		if p.Stop == skipped {
			fmt.Fprintf(&b, " %s |", strings.TrimSuffix(skipped+": "+p.Note, ": "))
		} else {
			fmt.Fprintf(&b, " %s |", p.Stop)
		}
		for _, v := range p.Theory {
			fmt.Fprintf(&b, " %s |", Num(v))
		}
		b.WriteString("\n")
	}
	main := r.TapIndex(shown[0])
	var bursty []string
	for _, p := range r.Points {
		if t := p.Taps[main]; strings.HasSuffix(t.Method, "+clustered") {
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
	var others []string
	for _, t := range r.Taps {
		if !slices.Contains(shown, t) {
			others = append(others, tapWords(t))
		}
	}
	if len(others) > 0 {
		fmt.Fprintf(&b, "\nThe other taps (%s) are in `table.csv`.\n", md(strings.Join(others, ", ")))
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

// tapWords names a tap for a reader: "BER", "FER", "pre-decoder BER", or the script's name.
func tapWords(tap string) string {
	switch tap {
	case link.TapBER:
		return "BER"
	case link.TapFER:
		return "FER"
	case link.TapPre:
		return "pre-decoder BER"
	}
	return tap
}

// tapHeads are the summary's column heads of one tap: what it counted, its errors, the
// estimate and the interval; with several taps shown each head names its tap.
func tapHeads(tap string, several bool) string {
	trials := "trials"
	switch tap {
	case link.TapBER, link.TapPre:
		trials = "bits"
	case link.TapFER:
		trials = "frames"
	}
	name := md(tapWords(tap))
	if !several {
		return fmt.Sprintf(" %s | errors | %s | interval |", trials, name)
	}
	return fmt.Sprintf(" %s %s | %s errors | %s | %s interval |", name, trials, name, name, name)
}
