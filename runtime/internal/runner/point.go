package runner

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// Point is one point of the sweep, as package sim's Point shows it to the script.
type Point struct {
	Index  int       // position in the run, 0-based
	Names  []string  // swept parameter names, x axis first
	Values []float64 // one per name
	Labels [][]string
}

// Get is the value of the named parameter. An unknown name stops the script with a message
// listing the swept names.
func (p Point) Get(name string) float64 {
	for i, n := range p.Names {
		if n == name {
			return p.Values[i]
		}
	}
	Fail(fmt.Errorf("sim.Point.Get: no swept parameter %q (swept: %s)", name, strings.Join(p.Names, ", ")))
	return math.NaN()
}

// Label is the label of a parameter swept with SweepLabels ("16-QAM"), or its value as text.
func (p Point) Label(name string) string {
	v := p.Get(name)
	for i, n := range p.Names {
		if n == name && p.Labels[i] != nil {
			return p.Labels[i][int(v)]
		}
	}
	return strconv.FormatFloat(v, 'g', -1, 64)
}

// text is the point's parameter values as the table shows them: "ebn0_db=4 code=1/2".
func (p Point) text() string {
	parts := make([]string, len(p.Names))
	for i, n := range p.Names {
		parts[i] = n + "=" + p.Label(n)
	}
	return strings.Join(parts, " ")
}
