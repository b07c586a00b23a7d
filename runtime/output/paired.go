package output

import (
	"bytes"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"tally/runtime/result"
)

// pairedColumns are table.csv's columns of a paired comparison: on a variant's row, its
// difference from the reference (BER − reference BER) and their ratio, each with its interval,
// and the p-value of no difference; empty on the reference's rows.
var pairedColumns = []string{"diff", "diff_low", "diff_high", "ratio", "ratio_low", "ratio_high", "diff_p"}

func pairedCells(p result.Point) []string {
	c := p.Paired
	if c == nil {
		return make([]string, len(pairedColumns))
	}
	return []string{Num(c.Diff), Num(c.DiffLow), Num(c.DiffHigh), Num(c.Ratio), Num(c.RatioLow), Num(c.RatioHigh), Num(c.P)}
}

// pairedSummary is README.md's section of a paired comparison: a line per point and variant
// with the verdict in words, both BERs, the difference and the ratio with their intervals and
// the discordant bits, then the method.
func pairedSummary(b *bytes.Buffer, r *result.Run) {
	if !r.Paired() {
		return
	}
	b.WriteString("## Paired comparison\n\n")
	var methods []string
	axis := variantsAxis(r)
	n := 0
	for _, p := range r.Points {
		c := p.Paired
		if c == nil {
			continue
		}
		var at []string
		for i, name := range r.Params {
			if i != axis {
				at = append(at, name+" "+r.Value(p, i))
			}
		}
		bits := int64(0)
		if len(p.Taps) > 0 {
			bits = p.Taps[0].Trials
		}
		fmt.Fprintf(b, "- %s, %s against %s: **%s**. BER %s against %s; difference %s [%s, %s], ratio %s [%s, %s]; of the same %d bits, %d were wrong in %s only and %d in %s only%s.\n",
			md(strings.Join(at, ", ")), md(c.Variant), md(c.Against), md(c.Verdict), g3(c.Rate), g3(c.RateRef),
			g3(c.Diff), g3(c.DiffLow), g3(c.DiffHigh), g3(c.Ratio), g3(c.RatioLow), g3(c.RatioHigh),
			bits, c.OnlyVariant, md(c.Variant), c.OnlyRef, md(c.Against), narrower(c.Narrower))
		n++
		if c.Method != "" && !slices.Contains(methods, c.Method) {
			methods = append(methods, c.Method)
		}
	}
	fmt.Fprintf(b, "\nEvery variant ran on the same frames as the reference: the same source bits, noise and fades, "+
		"drawn by role, so the comparison sees the designs' difference and not the luck of the draw. "+
		"Intervals (%g %%) and p-values are paired, frame by frame (%s): they hold whichever rule ended the point, a rule that watches the comparison included, and however errors cluster within frames.\n\n",
		100*r.Confidence, strings.Join(methods, ", "))
	if n > 1 {
		fmt.Fprintf(b, "Each comparison holds at %g %% on its own: were there no differences at all, about %.2g of these %d comparisons would show one by chance. "+
			"To claim them all at once, read as shown only those with p below %.2g (Bonferroni).\n\n",
			100*r.Confidence, float64(n)*(1-r.Confidence), n, (1-r.Confidence)/float64(n))
	}
}

// narrower says what pairing bought, for a comparison's line ("" when not known).
func narrower(k float64) string {
	if !(k > 1) || math.IsInf(k, 0) {
		return ""
	}
	return fmt.Sprintf("; the interval on the difference is %.2g times narrower than an unpaired comparison of these counts would give", k)
}

// g3 is a figure of the summary's prose: three significant digits, "∞" for an open end, "—"
// for none.
func g3(v float64) string {
	switch {
	case math.IsNaN(v):
		return "—"
	case math.IsInf(v, 1):
		return "∞"
	case math.IsInf(v, -1):
		return "−∞"
	}
	return strconv.FormatFloat(v, 'g', 3, 64)
}

// variantsAxis is the index of the parameter the variants are the values of: the one whose
// value is the variant's name at every compared point (-1 if none is).
func variantsAxis(r *result.Run) int {
	for i := range r.Params {
		all := true
		for _, p := range r.Points {
			if p.Paired != nil && r.Value(p, i) != p.Paired.Variant {
				all = false
				break
			}
		}
		if all {
			return i
		}
	}
	return -1
}
