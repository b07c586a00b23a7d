package output

import (
	"encoding/json"
	"math"
	"testing"

	"tally/runtime/result"
)

// A target whose interval the points' limits leave open (stats.AtTarget gives ±Inf) is written
// with a null end: encoding/json refuses infinities.
func TestRecordOpenTargetInterval(t *testing.T) {
	r := &result.Run{Name: "x", Targets: []result.Target{{Tap: "fer", Rate: 1e-3, Found: true, X: 4.2, Low: 3.9, High: math.Inf(1)}}}
	b, err := Record(r)
	if err != nil {
		t.Fatal(err)
	}
	var back struct {
		Targets []map[string]any `json:"targets"`
	}
	if err := json.Unmarshal(b, &back); err != nil {
		t.Fatal(err)
	}
	if len(back.Targets) != 1 || back.Targets[0]["x_high"] != nil || back.Targets[0]["x_low"] != 3.9 || back.Targets[0]["x"] != 4.2 {
		t.Errorf("targets %v", back.Targets)
	}
}
