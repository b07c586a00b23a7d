package capture

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	goruntime "runtime"
	"strconv"
	"strings"
	"time"

	"tally/plots"
	"tally/runtime/output"
)

// Record is run.json: the report with how it was made.
type Record struct {
	Tool      string    `json:"tool"`
	GoVersion string    `json:"go_version"`
	Command   []string  `json:"command"`
	Written   time.Time `json:"written"`
	*Report
}

// Files are the outputs of a counted capture, in the order they are written: table.csv,
// run.json, errors.svg, errors.png and README.md. args is the command line (for run.json and
// the README).
func Files(r *Report, c *Counts, args []string, now time.Time) ([]output.File, error) {
	rec, err := JSON(Record{Tool: "tally count", GoVersion: goruntime.Version(), Command: args, Written: now.UTC(), Report: r})
	if err != nil {
		return nil, fmt.Errorf("run.json: %w", err)
	}
	fig := plots.Errors(trace(r, c))
	svg, err := fig.SVG()
	if err != nil {
		return nil, fmt.Errorf("errors.svg: %w", err)
	}
	png, err := fig.PNG()
	if err != nil {
		return nil, fmt.Errorf("errors.png: %w", err)
	}
	return []output.File{
		{Name: "table.csv", Data: Table(c)},
		{Name: "run.json", Data: rec},
		{Name: "errors.svg", Data: svg},
		{Name: "errors.png", Data: png},
		{Name: "README.md", Data: summary(r, args)},
	}, nil
}

// JSON is v indented, with <, > and & as they are, and a final newline.
func JSON(v any) ([]byte, error) {
	var b bytes.Buffer
	enc := json.NewEncoder(&b)
	enc.SetEscapeHTML(false)
	enc.SetIndent("", "  ")
	if err := enc.Encode(v); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}

// Table is table.csv: a row per interval of the capture, with its time span when the line
// rate is known.
func Table(c *Counts) []byte {
	var b bytes.Buffer
	b.WriteString("row,start_bit,end_bit,")
	if c.Rate > 0 {
		b.WriteString("start_s,end_s,")
	}
	b.WriteString("bits,errors,ber,lost_bits,slips\n")
	for i, w := range c.Rows {
		fmt.Fprintf(&b, "%d,%d,%d,", i, w.Start, w.End)
		if c.Rate > 0 {
			fmt.Fprintf(&b, "%s,%s,", num(float64(w.Start)/float64(c.Rate)), num(float64(w.End)/float64(c.Rate)))
		}
		ber := ""
		if w.Bits() > 0 {
			ber = num(float64(w.Errors) / float64(w.Bits()))
		}
		fmt.Fprintf(&b, "%d,%d,%s,%d,%d\n", w.Bits(), w.Errors, ber, w.Lost, w.Slips)
	}
	return b.Bytes()
}

func num(v float64) string { return strconv.FormatFloat(v, 'g', 10, 64) }

func trace(r *Report, c *Counts) plots.ErrorTrace {
	scale, label := 1.0, "capture bit"
	if c.Rate > 0 {
		scale, label = 1/float64(c.Rate), "time (s)"
	}
	t := plots.ErrorTrace{
		Title:  "Errors in " + r.Capture,
		XLabel: label,
	}
	if c.Rate > 0 && c.Interval == c.Rate {
		t.YLabel = "errors per second"
	}
	parts := []string{r.Pattern + ", received " + r.Polarity,
		fmt.Sprintf("%s errors in %s bits, BER %s", grouped(r.Errors), grouped(r.Bits), g3(r.BER)),
		fmt.Sprintf("rows of %s bits", grouped(c.Interval))}
	if c.Rate > 0 {
		parts = append(parts, rateText(c.Rate))
	}
	t.Caption = strings.Join(parts, " · ")
	for _, w := range c.Rows {
		t.From = append(t.From, float64(w.Start)*scale)
		t.To = append(t.To, float64(w.End)*scale)
		t.Errors = append(t.Errors, w.Errors)
		t.Lost = append(t.Lost, w.Lost > 0)
	}
	for _, s := range c.Slips {
		t.Slips = append(t.Slips, float64(s.Bit)*scale)
		t.SlipLabels = append(t.SlipLabels, slipLabel(s))
	}
	if g := c.G821; g != nil {
		for _, p := range g.Periods {
			t.Unavailable = append(t.Unavailable, [2]float64{float64(p.Start), float64(p.Start + p.Length)})
		}
	}
	return t
}

func slipLabel(s Slip) string {
	switch {
	case !s.Regained:
		return "lost"
	case !s.Known:
		return "?"
	case s.Shift > 0:
		return "+" + strconv.FormatInt(s.Shift, 10)
	case s.Shift < 0:
		return "−" + strconv.FormatInt(-s.Shift, 10)
	}
	return "inv"
}

// summary is README.md: the findings, the plot, the table's first rows.
func summary(r *Report, args []string) []byte {
	var b bytes.Buffer
	fmt.Fprintf(&b, "# Errors in %s\n\n", r.Capture)
	fmt.Fprintf(&b, "`tally %s` · capture SHA-256 `%s`\n\n", strings.Join(args, " "), r.SHA256)
	b.WriteString("![errors per interval](errors.png)\n\n```\n")
	b.WriteString(Text(r))
	b.WriteString("```\n\n")
	b.WriteString("| file | what it holds |\n|---|---|\n")
	b.WriteString("| `table.csv` | a row per interval: bits compared, errors, BER, bits not compared, slips |\n")
	b.WriteString("| `run.json` | every figure above as fields, the slips one by one, the capture's SHA-256 and the command |\n")
	b.WriteString("| `errors.svg`, `errors.png` | errors per interval, slips marked, unavailable time shaded |\n")
	if math.IsNaN(r.BER) {
		b.WriteString("\nNo bit was compared.\n")
	}
	return b.Bytes()
}
