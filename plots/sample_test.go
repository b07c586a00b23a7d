package plots

import (
	"math"

	"tally/blocks/stats"
	"tally/runtime/result"
)

// sampleRun is a run shaped like a real one: BPSK over AWGN at Eb/N0 0…10 dB with counts drawn
// near the textbook curve Pb = ½ erfc(√(Eb/N0)) (Proakis, Digital Communications, 5th ed.
// 2008, eq. 4.3-13), the points past 8 dB showing no errors, with a second parameter (a code)
// when grid is set and a pre-decoder tap when coded is set. The counts are made up for the
// drawing; nothing is checked against them.
func sampleRun(grid, coded bool) *result.Run {
	r := &result.Run{Name: "sensor uplink", Script: "uplink.go", Seed: 1, Confidence: 0.95, Method: "clopper-pearson",
		Params: []string{"ebn0_db"}, Taps: []string{"ber", "fer"}, Theory: []string{"bpsk"}}
	if coded {
		r.Taps = append(r.Taps, "pre")
	}
	seconds := []float64{0}
	if grid {
		r.Params = append(r.Params, "backoff_db")
		seconds = []float64{0, 1.5, 3}
	}
	for ci, shift := range seconds {
		for x := 0.0; x <= 10; x += 1 {
			pb := 0.5 * math.Erfc(math.Sqrt(math.Pow(10, (x-shift)/10)))
			n := int64(1e6)
			k := int64(math.Round(pb * float64(n)))
			if x >= 9 {
				k = 0
			}
			p := result.Point{Values: []float64{x}, Theory: []float64{0.5 * math.Erfc(math.Sqrt(math.Pow(10, x/10)))}, Stop: "bits"}
			if grid {
				p.Values = append(p.Values, shift)
			}
			add := func(name string, k, n int64) {
				e, _ := stats.ClopperPearson(k, n, 0.95)
				p.Taps = append(p.Taps, result.Tap{Name: name, Trials: n, Errors: k, Rate: e.Rate, Low: e.Low, High: e.High})
			}
			add("ber", k, n)
			fk := min(int64(1000), k)
			add("fer", fk, 1000)
			if coded {
				add("pre", min(n, k*3+int64(ci)), n)
			}
			r.Points = append(r.Points, p)
		}
	}
	return r
}
