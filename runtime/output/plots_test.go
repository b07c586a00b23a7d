package output

import (
	"bytes"
	"image/png"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"tally/blocks/stats"
	"tally/runtime/result"
)

func plotRun() *result.Run {
	r := &result.Run{Name: "test link", Script: "t.go", Seed: 1, Confidence: 0.95, Method: "clopper-pearson",
		Params: []string{"ebn0_db"}, Taps: []string{"ber", "fer"}}
	for i, k := range []int64{500, 120, 9, 0} {
		e, _ := stats.ClopperPearson(k, 100000, 0.95)
		r.Points = append(r.Points, result.Point{Values: []float64{float64(2 * i)}, Stop: "bits",
			Taps: []result.Tap{{Name: "ber", Trials: 100000, Errors: k, Rate: e.Rate, Low: e.Low, High: e.High},
				{Name: "fer", Trials: 100, Errors: min(k, 100)}}})
	}
	return r
}

// Write puts ber.svg and ber.png beside the table, the README embeds the PNG, and a second
// write of the same run leaves table.csv and ber.svg byte for byte the same.
func TestWriteIncludesPlots(t *testing.T) {
	dir := t.TempDir()
	if err := Write(dir, plotRun()); err != nil {
		t.Fatal(err)
	}
	read := func(name string) []byte {
		b, err := os.ReadFile(filepath.Join(dir, name))
		if err != nil {
			t.Fatal(err)
		}
		return b
	}
	svg, table := read("ber.svg"), read("table.csv")
	if _, err := png.Decode(bytes.NewReader(read("ber.png"))); err != nil {
		t.Errorf("ber.png: %v", err)
	}
	if !strings.Contains(string(read("README.md")), "![test link](ber.png)") {
		t.Errorf("README.md does not embed ber.png:\n%s", read("README.md"))
	}
	if err := Write(dir, plotRun()); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(svg, read("ber.svg")) || !bytes.Equal(table, read("table.csv")) {
		t.Error("a rewrite of the same run changed ber.svg or table.csv")
	}
}

// A run that counted nothing has no plot, and that is no error.
func TestNoPlotForNothing(t *testing.T) {
	r := &result.Run{Name: "empty", Params: []string{"ebn0_db"}, Taps: []string{"ber"},
		Points: []result.Point{{Values: []float64{0}, Taps: []result.Tap{{Name: "ber"}}}}}
	files, err := Files(r)
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range files {
		if strings.HasPrefix(f.Name, "ber.") {
			t.Errorf("a plot %s for a run with no trials", f.Name)
		}
	}
}
