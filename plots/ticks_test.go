package plots

import (
	"math"
	"slices"
	"strconv"
	"testing"

	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/recorder"

	"tally/blocks/stats"
	"tally/runtime/result"
)

// sweepRun is a run over a swept parameter at the given values (counts made up for the
// drawing; nothing is checked against them), with the frame panel beside the BER panel when
// frames is set.
func sweepRun(param string, xs []float64, frames bool) *result.Run {
	r := &result.Run{Name: "sampling offset", Script: "offset.go", Seed: 1, Confidence: 0.95, Method: "clopper-pearson",
		Params: []string{param}, Taps: []string{"ber", "fer"}}
	for i, x := range xs {
		p := result.Point{Values: []float64{x}, Stop: "bits"}
		k := int64(10 + 40*i)
		fk := int64(5 + 2*i)
		if !frames {
			fk = min(k, 1000)
		}
		for _, c := range []struct {
			name string
			k, n int64
		}{{"ber", k, 1e6}, {"fer", fk, 1000}} {
			e, _ := stats.ClopperPearson(c.k, c.n, 0.95)
			p.Taps = append(p.Taps, result.Tap{Name: c.name, Trials: c.n, Errors: c.k, Rate: e.Rate, Low: e.Low, High: e.High})
		}
		r.Points = append(r.Points, p)
	}
	return r
}

// The x tick labels of a swept axis read as the values typed, and no two of them overlap,
// whatever the step and however narrow the panel (common practice, no source). The labels
// are read back from the drawing itself (gonum's recording canvas), measured with the font
// they were drawn in.
func TestSweepTickLabelsDoNotOverlap(t *testing.T) {
	var sweep005, sweep01, dense []float64
	for i := 0; i <= 8; i++ {
		sweep005 = append(sweep005, math.Round(float64(i)*5)/100) // 0, 0.05, …, 0.4
	}
	for i := 0; i <= 20; i++ {
		sweep01 = append(sweep01, math.Round(float64(i))/10) // 0, 0.1, …, 2
	}
	for i := 0; i <= 40; i++ {
		dense = append(dense, math.Round(float64(i)*25)/1000) // 0, 0.025, …, 1
	}
	for _, c := range []struct {
		name   string
		xs     []float64
		frames bool
	}{{"0.05 step", sweep005, false}, {"0.05 step, two panels", sweep005, true},
		{"0.1 step", sweep01, true}, {"0.025 step, two panels", dense, true}} {
		f, err := BER(sweepRun("offset", c.xs, c.frames))
		if err != nil {
			t.Fatal(err)
		}
		rec := &recorder.Canvas{}
		f.draw(draw.NewCanvas(rec, f.Width, f.Height))
		want := map[string]bool{}
		for _, x := range c.xs {
			want[strconv.FormatFloat(x, 'g', -1, 64)] = true
		}
		// The x tick labels are the strings drawn that name swept values, on the lowest row
		// of text of each panel.
		type label struct {
			x, w, y vg.Length
			s       string
		}
		var labels []label
		for _, a := range rec.Actions {
			fs, ok := a.(*recorder.FillString)
			if !ok || !want[fs.String] {
				continue
			}
			st := textStyle(sans(fs.Size), ink)
			labels = append(labels, label{x: fs.Point.X, w: st.Width(fs.String), y: fs.Point.Y, s: fs.String})
		}
		if len(labels) == 0 {
			t.Fatalf("%s: no tick label drawn", c.name)
		}
		low := slices.MinFunc(labels, func(a, b label) int { return cmpLen(a.y, b.y) }).y
		var row []label
		for _, l := range labels {
			if math.Abs(float64(l.y-low)) < 1 {
				row = append(row, l)
			}
		}
		slices.SortFunc(row, func(a, b label) int { return cmpLen(a.x, b.x) })
		var got []string
		for i, l := range row {
			got = append(got, l.s)
			if i > 0 && l.x < row[i-1].x+row[i-1].w {
				t.Errorf("%s: label %q at %.1f overlaps %q at %.1f (width %.1f)", c.name, l.s, l.x, row[i-1].s, row[i-1].x, row[i-1].w)
			}
		}
		if c.name == "0.05 step" && !slices.Contains(got, "0.15") {
			t.Errorf("%s: labels %v, want 0.15 among them", c.name, got)
		}
		if len(got) < 3 {
			t.Errorf("%s: only %v labelled", c.name, got)
		}
	}
}

func cmpLen(a, b vg.Length) int {
	switch {
	case a < b:
		return -1
	case a > b:
		return 1
	}
	return 0
}
