package sim

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"tally/runtime/internal/runner"
)

// Point is one point of the sweep: a value for every swept parameter.
type Point struct {
	Index  int       // position in the run, 0-based
	Names  []string  // swept parameter names, x axis first
	Values []float64 // one per name
	labels [][]string
}

func pointOf(p runner.Point) Point {
	return Point{Index: p.Index, Names: p.Names, Values: p.Values, labels: p.Labels}
}

func (p Point) in() runner.Point {
	return runner.Point{Index: p.Index, Names: p.Names, Values: p.Values, Labels: p.labels}
}

// Get is the value of the named parameter. An unknown name stops the script with a message
// listing the swept names.
func (p Point) Get(name string) float64 { return p.in().Get(name) }

// Int is Get as an int, for counts such as bits of an ADC or a modulation order.
func (p Point) Int(name string) int { return int(math.Round(p.Get(name))) }

// Label is the label of a parameter swept with SweepLabels ("16-QAM"), or its value as text.
func (p Point) Label(name string) string { return p.in().Label(name) }

// Range is from, from+step, … up to to (included when it falls on the grid, allowing for
// rounding), computed as from + i·step so no error accumulates, and each value rounded to the
// decimal places of from and step as typed: Range(0, 0.4, 0.05) gives 0, 0.05, 0.1, 0.15, …,
// the numbers a person wrote, not 0.15000000000000002.
func Range(from, to, step float64) []float64 {
	if !(step > 0) || math.IsInf(from, 0) || math.IsInf(to, 0) || math.IsNaN(from) || math.IsNaN(to) {
		runner.Fail(fmt.Errorf("sim.Range: step %v must be positive and the ends (%v, %v) finite", step, from, to))
		return nil
	}
	places := max(decimals(from), decimals(step))
	var v []float64
	for i := 0; ; i++ {
		x := from + float64(i)*step
		if x > to+step*1e-9 {
			break
		}
		v = append(v, onGrid(x, places))
	}
	return v
}

// decimals is the number of decimal places of v written in its shortest exact form (0.05: 2,
// 1e-7: 7, 3: 0).
func decimals(v float64) int {
	s := strconv.FormatFloat(math.Abs(v), 'f', -1, 64)
	if i := strings.IndexByte(s, '.'); i >= 0 {
		return len(s) - i - 1
	}
	return 0
}

// onGrid rounds x to places decimals (the float nearest that decimal), when the decimal form
// is short enough to be exact in a float64; otherwise x as computed.
func onGrid(x float64, places int) float64 {
	if places > 15 {
		return x
	}
	r, err := strconv.ParseFloat(strconv.FormatFloat(x, 'f', places, 64), 64)
	if err != nil {
		return x
	}
	return r
}
