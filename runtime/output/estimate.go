package output

import (
	"bytes"
	"fmt"
	"strconv"

	"tally/runtime/result"
)

// Weighted reports whether any point's BER tap was estimated with weights (importance
// sampling, semi-analytic): the table and summary then say how.
func Weighted(r *result.Run) bool {
	for _, p := range r.Points {
		if len(p.Taps) > 0 && p.Taps[0].Weighted() {
			return true
		}
	}
	return false
}

// estimatorColumns close the table of a run with weighted points: the BER tap's estimator
// ("count" for counted points), Kish's effective sample size of its weights, "degenerate"
// when the weights degenerated, and the bits plain counting would need for the same precision.
var estimatorColumns = []string{"estimator", "effective_samples", "weights", "plain_bits_needed"}

func estimatorCells(p result.Point) []string {
	if len(p.Taps) == 0 || !p.Taps[0].Weighted() {
		return []string{"count", "", "", ""}
	}
	t := p.Taps[0]
	state := "ok"
	if t.Degenerate {
		state = "degenerate"
	}
	plain := ""
	if t.PlainBits > 0 {
		plain = strconv.FormatFloat(t.PlainBits, 'g', 3, 64)
	}
	return []string{t.Estimator, strconv.FormatFloat(t.Effective, 'f', 0, 64), state, plain}
}

// estimatorSummary is the README's paragraph on weighted points: what each took against what
// plain counting would have needed, and which are not to be read as precise.
func estimatorSummary(b *bytes.Buffer, r *result.Run) {
	if !Weighted(r) {
		return
	}
	b.WriteString("\n## Estimators\n\n")
	b.WriteString("Points marked in the plot were estimated by importance sampling or semi-analytically (see the README of tally): ")
	b.WriteString("their intervals come from the variance of the weighted sums between frames (Student t), and `errors` counts the decisions ")
	b.WriteString("wrong in the biased (or noise-free) simulation, not the link's errors. Plain counting would need about (rate/standard error)² errors, ")
	b.WriteString("so `plain bits` = that many errors over the rate.\n\n|")
	for _, p := range r.Params {
		fmt.Fprintf(b, " %s |", p)
	}
	b.WriteString(" estimator | bits run | BER | plain bits needed | ratio | effective samples |\n|")
	for range len(r.Params) + 6 {
		b.WriteString("---|")
	}
	b.WriteString("\n")
	var bad []string
	for _, p := range r.Points {
		if len(p.Taps) == 0 || !p.Taps[0].Weighted() {
			continue
		}
		t := p.Taps[0]
		b.WriteString("|")
		for i := range r.Params {
			fmt.Fprintf(b, " %s |", r.Value(p, i))
		}
		plain, ratio := "—", "—"
		if t.PlainBits > 0 && t.Trials > 0 {
			plain = fmt.Sprintf("%.2g", t.PlainBits)
			ratio = fmt.Sprintf("%.2g×", t.PlainBits/float64(t.Trials))
		}
		eff := fmt.Sprintf("%.0f", t.Effective)
		if t.Degenerate {
			eff += " (degenerate)"
			bad = append(bad, fmt.Sprintf("%s %s", r.Params[0], r.Value(p, 0)))
		}
		fmt.Fprintf(b, " %s | %d | %s | %s | %s | %s |\n", t.Estimator, t.Trials, Num(t.Rate), plain, ratio, eff)
	}
	if len(bad) > 0 {
		fmt.Fprintf(b, "\nThe weights degenerated at %v: a few decisions carry the sum, so those intervals are not to be read as precise; run longer, set the shift, or use the semi-analytic estimator.\n", bad)
	}
}
