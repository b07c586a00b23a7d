package output

import (
	"encoding/json"
	"math"
	"strings"
	"testing"
	"time"

	"tally/runtime/result"
)

// For finite values JSON is encoding/json's MarshalIndent byte for byte (the reference is the
// standard library): field order, tag names, omitempty, embedded structs with a shadowing
// outer field (run.json's record), maps, times and nil slices.
func TestJSONMatchesEncodingJSON(t *testing.T) {
	r := plotRun()
	r.Labels = [][]string{nil}
	r.Theory = []string{"bpsk"}
	r.Start = time.Date(2026, 1, 2, 3, 4, 5, 6, time.UTC)
	r.Targets = []result.Target{{Tap: "ber", Rate: 1e-3, Found: true, X: 3.2, Low: 3, High: 3.5, Against: "bpsk", Penalty: 0.25}}
	for i := range r.Points {
		r.Points[i].Theory = []float64{1e-3 / float64(i+1)}
	}
	rec := record{Run: r}
	for _, p := range r.Points {
		rec.Points = append(rec.Points, recordPoint{Params: map[string]string{"ebn0_db": "1", "a": "b"}, Point: p})
	}
	type inner struct {
		A int    `json:"a"`
		B string `json:"b,omitempty"`
		c int
	}
	type outer struct {
		*inner
		A     string            `json:"a"` // shadows inner.A
		Skip  int               `json:"-"`
		Empty []int             `json:"empty,omitempty"`
		Nil   []int             `json:"nil"`
		Map   map[string]uint64 `json:"map"`
		Any   any               `json:"any"`
		Plain float32
	}
	for _, v := range []any{rec, r, outer{inner: &inner{A: 1, B: "x"}, A: "y", Map: map[string]uint64{"z": 1, "a": 2}, Any: 1.5, Plain: 0.1},
		outer{}, []float64{1e21, 1e-7, 0.1, -0}} {
		want, err := json.MarshalIndent(v, "", "  ")
		if err != nil {
			t.Fatal(err)
		}
		got, err := JSON(v)
		if err != nil {
			t.Fatal(err)
		}
		if string(got) != string(want) {
			t.Errorf("%T differs from encoding/json:\n%s\nwant\n%s", v, got, want)
		}
	}
}

// A value JSON has no form for is null, where encoding/json fails the whole record.
func TestJSONNonFiniteIsNull(t *testing.T) {
	r := plotRun()
	r.Targets = []result.Target{{Tap: "ber", Rate: 1e-5, Found: true, X: 9.9, Low: math.Inf(-1), High: math.Inf(1), Penalty: math.NaN(),
		Open: "open above"}}
	r.Points[0].Taps[0].Dispersion = math.Inf(1)
	if _, err := json.Marshal(r); err == nil {
		t.Fatal("encoding/json encoded +Inf: the test no longer shows anything")
	}
	b, err := Record(r)
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{`"x_low": null`, `"x_high": null`, `"penalty_db": null`, `"dispersion": null`, `"open": "open above"`} {
		if !strings.Contains(string(b), want) {
			t.Errorf("run.json lacks %s", want)
		}
	}
	var back map[string]any
	if err := json.Unmarshal(b, &back); err != nil {
		t.Errorf("run.json does not parse: %v", err)
	}
	var read result.Run
	if err := json.Unmarshal(b, &read); err != nil {
		t.Fatal(err)
	}
	if tr := read.Targets[0]; !math.IsInf(tr.Low, -1) || !math.IsInf(tr.High, 1) || tr.X != 9.9 || tr.Open != "open above" {
		t.Errorf("run.json read back: target %+v, want the open ends as ∓Inf", tr)
	}
	if s := string(Summary(r, nil)); !strings.Contains(s, `interval \[open, open\]`) || !strings.Contains(s, "(open above)") {
		t.Errorf("README.md does not say the interval is open:\n%s", s)
	}
	if Num(math.Inf(1)) != "" || Num(math.Inf(-1)) != "" || Num(math.NaN()) != "" {
		t.Error("a non-finite value is not an empty cell in table.csv")
	}
}
