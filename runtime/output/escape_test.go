package output

import (
	"bytes"
	"encoding/csv"
	"regexp"
	"strings"
	"testing"

	"tally/runtime/result"
)

// hostileRun has a name that is HTML and labels that are spreadsheet formulas and Markdown.
func hostileRun() *result.Run {
	r := &result.Run{Name: `<img src=x onerror="alert(1)"> uplink | [x](http://example.invalid)`, Script: "t.go",
		Confidence: 0.95, Method: "clopper-pearson", Params: []string{"ebn0_db", "modem"},
		Labels: [][]string{nil, {`=HYPERLINK("http://example.invalid","ok")`, "+1+1", "@SUM(A1)", "-cmd", "<b>QPSK</b>"}},
		Taps:   []string{"ber"}, Theory: []string{"<i>t</i>"}}
	for k := range 5 {
		r.Points = append(r.Points, result.Point{Values: []float64{-3, float64(k)}, Stop: "bits",
			Taps: []result.Tap{{Name: "ber", Trials: 1000, Errors: 10, Rate: 0.01, Low: 0.005, High: 0.02}}, Theory: []float64{0.01}})
	}
	return r
}

// table.csv: a label that starts with = + - @ is text to a spreadsheet (a leading apostrophe,
// OWASP's "CSV injection" advice, common practice), while a negative number stays a number.
// Before, =HYPERLINK(…) went out as a live formula.
func TestTableCellsAreNotFormulas(t *testing.T) {
	rows, err := csv.NewReader(bytes.NewReader(Table(hostileRun()))).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	want := []string{`'=HYPERLINK("http://example.invalid","ok")`, "'+1+1", "'@SUM(A1)", "'-cmd", "<b>QPSK</b>"}
	for i, w := range want {
		row := rows[i+1]
		if row[0] != "-3" {
			t.Errorf("row %d: the number -3 became %q", i+1, row[0])
		}
		if row[1] != w {
			t.Errorf("row %d: label cell %q, want %q", i+1, row[1], w)
		}
	}
}

// README.md shows names and labels as text: no raw HTML reaches the code host's renderer and
// no label opens a link or breaks the table. Before, the name went in as it was.
func TestSummaryEscapesNamesAndLabels(t *testing.T) {
	s := string(Summary(hostileRun(), []string{"ber.png"}))
	for _, bad := range []string{"<img", "<b>", "<i>"} {
		if strings.Contains(s, bad) {
			t.Errorf("README.md passes %q through:\n%s", bad, s)
		}
	}
	if regexp.MustCompile(`[^\\]\]\(http`).MatchString(s) {
		t.Errorf("README.md passes a link through:\n%s", s)
	}
	if !strings.Contains(s, "# &lt;img src=x onerror=\"alert(1)\"&gt; uplink \\| \\[x\\](http://example.invalid)\n") {
		t.Errorf("the title is not the escaped name:\n%s", s)
	}
	for _, line := range strings.Split(s, "\n") {
		if strings.HasPrefix(line, "| -3 |") && strings.Count(strings.ReplaceAll(line, `\|`, ""), "|") != 9 {
			t.Errorf("a label broke the table row: %s", line)
		}
	}
}
