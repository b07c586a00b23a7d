package output

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"

	"tally/runtime/result"
)

// record is run.json: the run with, per point, the BER tap's figures flattened beside the
// parameters so a reader need not know the tap layout.
type record struct {
	*result.Run
	Points []recordPoint `json:"points"`
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
	// JSON, not encoding/json: a value with no JSON form (an interval open at one end) is null,
	// never a run lost at its end.
	b, err := JSON(rec)
	return append(b, '\n'), err
}

// ReadRecord reads run.json from a run's outputs folder (tally watch and the live page show an
// earlier run from it); nil when there is none, it does not parse, or it holds no point. A
// theory value run.json writes as null (none exists) reads back as NaN, not 0; an open target
// end reads back as ∓Inf (result.Target).
func ReadRecord(dir string) *result.Run {
	b, err := os.ReadFile(filepath.Join(dir, "run.json"))
	if err != nil {
		return nil
	}
	var r result.Run
	if json.Unmarshal(b, &r) != nil || len(r.Points) == 0 {
		return nil
	}
	var nulls struct {
		Points []struct {
			Theory []*float64 `json:"theory"`
		} `json:"points"`
	}
	if json.Unmarshal(b, &nulls) == nil && len(nulls.Points) == len(r.Points) {
		for i, p := range nulls.Points {
			for k, t := range p.Theory {
				if t == nil && k < len(r.Points[i].Theory) {
					r.Points[i].Theory[k] = math.NaN()
				}
			}
		}
	}
	return &r
}
