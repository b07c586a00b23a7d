package plots_test

import (
	"bytes"
	"fmt"
	"math"
	"math/rand/v2"

	"tally/blocks/stats"
	"tally/plots"
	"tally/runtime/result"
)

// A scatter of QPSK symbols through noise, beside the four ideal points.
func ExampleConstellation() {
	ideal := []complex128{
		complex(math.Sqrt2/2, math.Sqrt2/2), complex(-math.Sqrt2/2, math.Sqrt2/2),
		complex(-math.Sqrt2/2, -math.Sqrt2/2), complex(math.Sqrt2/2, -math.Sqrt2/2),
	}
	r := rand.New(rand.NewPCG(1, 2))
	rx := make([]complex128, 2000)
	for i := range rx {
		rx[i] = ideal[r.IntN(4)] + complex(0.15*r.NormFloat64(), 0.15*r.NormFloat64())
	}
	f := plots.Constellation("QPSK at Es/N0 = 13.5 dB", rx, ideal)
	svg, err := f.SVG()
	if err != nil {
		panic(err)
	}
	png, err := f.PNG()
	if err != nil {
		panic(err)
	}
	fmt.Println(bytes.HasPrefix(svg, []byte("<?xml")), bytes.HasPrefix(png, []byte("\x89PNG")))
	// Output: true true
}

// The figure of a finished run, as tally writes it beside the table (ber.svg, ber.png).
func ExampleBER() {
	r := &result.Run{Name: "sensor uplink", Params: []string{"ebn0_db"}, Taps: []string{"ber", "fer"},
		Confidence: 0.95, Theory: []string{"bpsk"}}
	for i, x := range []float64{0, 2, 4, 6, 8} {
		k := []int64{7900, 3750, 1250, 240, 0}[i]
		e, _ := stats.ClopperPearson(k, 100000, 0.95)
		r.Points = append(r.Points, result.Point{Values: []float64{x},
			Taps:   []result.Tap{{Name: "ber", Trials: 100000, Errors: k, Rate: e.Rate, Low: e.Low, High: e.High}},
			Theory: []float64{0.5 * math.Erfc(math.Sqrt(math.Pow(10, x/10)))}})
	}
	f, err := plots.BER(r)
	if err != nil {
		panic(err)
	}
	svg, _ := f.SVG()
	fmt.Println(len(f.Panels), "panel;", bytes.Contains(svg, []byte("Eb/N0 (dB)")))
	// Output: 1 panel; true
}
