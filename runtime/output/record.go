package output

import (
	"encoding/json"
	"math"

	"tally/runtime/result"
)

// record is run.json: the run with, per point, the BER tap's figures flattened beside the
// parameters so a reader need not know the tap layout.
type record struct {
	*result.Run
	Points  []recordPoint  `json:"points"`
	Targets []recordTarget `json:"targets,omitempty"`
}

// recordTarget is a target with the ends of its interval null where the points' limits do not
// close it (±Inf, which JSON cannot hold).
type recordTarget struct {
	result.Target
	Low  *float64 `json:"x_low"`
	High *float64 `json:"x_high"`
}

func finite(v float64) *float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return &v
}

type recordPoint struct {
	Params map[string]string `json:"params"`
	Theory []*float64        `json:"theory"` // null where a curve has no value (NaN)
	Bits   int64             `json:"bits"`
	Errors int64             `json:"errors"`
	BER    float64           `json:"ber"`
	Low    float64           `json:"ci_low"`
	High   float64           `json:"ci_high"`
	result.Point
}

// Record is run.json.
func Record(r *result.Run) ([]byte, error) {
	rec := record{Run: r}
	for _, t := range r.Targets {
		rec.Targets = append(rec.Targets, recordTarget{Target: t, Low: finite(t.Low), High: finite(t.High)})
	}
	for _, p := range r.Points {
		rp := recordPoint{Params: map[string]string{}, Point: p}
		for _, v := range p.Theory {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				rp.Theory = append(rp.Theory, nil)
			} else {
				rp.Theory = append(rp.Theory, &v)
			}
		}
		for i, n := range r.Params {
			rp.Params[n] = r.Value(p, i)
		}
		if len(p.Taps) > 0 {
			t := p.Taps[0]
			rp.Bits, rp.Errors, rp.BER, rp.Low, rp.High = t.Trials, t.Errors, t.Rate, t.Low, t.High
		}
		rec.Points = append(rec.Points, rp)
	}
	b, err := json.MarshalIndent(rec, "", "  ")
	return append(b, '\n'), err
}
