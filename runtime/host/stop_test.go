package host

import (
	"context"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// A script says "at least 30 frames and 100 errors" with stop.All(stop.Errors(100),
// stop.Frames(30)): at 0 dB (BER about 0.079, 81 errors in each 1024-bit frame) the point ends
// at exactly 30 frames with the fixed-sample interval; at 6 dB (BER about 2.4e-3, 2.4 errors a
// frame) it ends by the error count after the minimum, with the stage-wise one.
// BPSK BER from Proakis, Digital Communications, 4th ed., 2001, eq. 5.2-5 (values from
// memory).
func TestAllRuleInScript(t *testing.T) {
	p := scriptIn(t, "custom.go")
	src, _ := os.ReadFile(p)
	s := strings.Replace(string(src), "x.Stop(stop.Errors(200), stop.Bits(1e6))",
		"x.Stop(stop.All(stop.Errors(100), stop.Frames(30)), stop.Bits(1e6))", 1)
	os.WriteFile(p, []byte(s), 0o644)
	if err := Run(context.Background(), p, quiet(2)); err != nil {
		t.Fatal(err)
	}
	b, err := os.ReadFile(filepath.Join(strings.TrimSuffix(p, ".go"), "run.json"))
	if err != nil {
		t.Fatal(err)
	}
	var run struct {
		Points []struct {
			Values []float64
			Frames int64
			Stop   string
			Taps   []struct {
				Name   string
				Errors int64
				Method string
			}
		}
	}
	if err := json.Unmarshal(b, &run); err != nil {
		t.Fatal(err)
	}
	for _, pt := range run.Points {
		db, ber := pt.Values[0], pt.Taps[0]
		if pt.Stop != "all(errors,frames)" || pt.Frames < 30 || ber.Name != "ber" || ber.Errors < 100 {
			t.Errorf("ebn0_db %g: stop %q after %d frames and %d errors; want all(errors,frames), at least 30 and 100",
				db, pt.Stop, pt.Frames, ber.Errors)
		}
		if db == 0 && pt.Frames != 30 || db == 6 && pt.Frames == 30 {
			t.Errorf("ebn0_db %g ended after %d frames, not the case meant", db, pt.Frames)
		}
		want := "stagewise"
		if pt.Frames == 30 {
			want = "clopper-pearson"
		}
		if !strings.HasPrefix(ber.Method, want) {
			t.Errorf("ebn0_db %g, %d frames: method %q, want %s", db, pt.Frames, ber.Method, want)
		}
	}
}
