package sim

import (
	"fmt"
	"strings"
	"testing"

	"tally/blocks/channel"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/source"
	"tally/blocks/stop"
	"tally/runtime/internal/runner"
	"tally/runtime/output"
)

// twoReceivers is BPSK over AWGN in 512-bit frames; the variant "hot" runs 1 dB more Eb/N0
// (a better receiver, on the same bits and noise scaled), "same" is the reference again.
func twoReceivers(p Point) *link.Link {
	m := modem.BPSK()
	db := p.Get("ebn0_db")
	if p.Label("rx") == "hot" {
		db++
	}
	return link.Chain(source.Random(512), m.Mod(), channel.AWGN(db), m.Demod())
}

// A better variant is shown better and ends the point by stop.Shown; a variant identical to
// the reference makes the same errors in every frame, so its comparison says so and the point
// runs to its cap. The reference's rows carry no comparison.
func TestVariantsCompareOnSameFrames(t *testing.T) {
	x := testExperiment("paired", &runner.Options{Quiet: true, Workers: 2})
	x.Sweep("ebn0_db", 2, 4)
	x.Variants("rx", "ref", "hot")
	x.Link(twoReceivers)
	x.Stop(stop.Shown(), stop.Bits(2e6))
	r, err := x.execute()
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Points) != 4 {
		t.Fatalf("%d rows, want 4", len(r.Points))
	}
	for i, p := range r.Points {
		if (i < 2) != (p.Paired == nil) {
			t.Fatalf("row %d: comparison %+v", i, p.Paired)
		}
		if p.Stop != "shown" {
			t.Errorf("row %d: stop %q, want shown", i, p.Stop)
		}
		if i >= 2 {
			c := p.Paired
			if !c.Shown || !(c.Diff < 0) || !strings.Contains(c.Verdict, "hot makes fewer errors than ref") || c.OnlyVariant > c.OnlyRef {
				t.Errorf("row %d: %+v", i, c)
			}
			if p.Frames != r.Points[i-2].Frames || p.Taps[0].Trials != r.Points[i-2].Taps[0].Trials {
				t.Errorf("row %d: the variant ran %d frames, the reference %d", i, p.Frames, r.Points[i-2].Frames)
			}
		}
	}

	y := testExperiment("identical", &runner.Options{Quiet: true, Workers: 2})
	y.Sweep("ebn0_db", 3)
	y.Variants("rx", "ref", "same")
	y.Link(twoReceivers)
	y.Stop(stop.Shown(), stop.Bits(200*512))
	r, err = y.execute()
	if err != nil {
		t.Fatal(err)
	}
	c := r.Points[1].Paired
	if r.Points[1].Stop != "bits" || c.Shown || c.OnlyRef != 0 || c.OnlyVariant != 0 || c.Diff != 0 ||
		!strings.Contains(c.Verdict, "the same number of errors in each of the 200 frames") {
		t.Fatalf("identical variants: stop %q, %+v", r.Points[1].Stop, c)
	}
	csv := string(output.Table(r))
	if !strings.Contains(csv, "rx,ber_trials,ber_errors,ber,ber_low,ber_high,stop,") || !strings.HasSuffix(strings.SplitN(csv, "\n", 2)[0], ",diff,diff_low,diff_high,ratio,ratio_low,ratio_high,diff_p") {
		t.Fatalf("table head:\n%s", csv)
	}
	if sum := string(output.Summary(r, nil)); !strings.Contains(sum, "## Paired comparison") || !strings.Contains(sum, "same against ref") {
		t.Fatalf("summary:\n%s", sum)
	}
}

// What a paired comparison cannot be is refused with the reason.
func TestVariantsRefusals(t *testing.T) {
	for _, c := range []struct {
		name string
		set  func(x *Experiment)
		want string
	}{
		{"variants first", func(x *Experiment) { x.Variants("rx", "ref", "hot"); x.Sweep("ebn0_db", 2) }, "declare x.Sweep(…) first"},
		{"shown without variants", func(x *Experiment) { x.Sweep("ebn0_db", 2); x.Stop(stop.Shown()) }, "declares no variants"},
		{"estimator", func(x *Experiment) {
			x.Sweep("ebn0_db", 2)
			x.Variants("rx", "ref", "hot")
			x.Estimate("importance")
		}, "counts errors"},
	} {
		x := testExperiment(c.name, &runner.Options{Quiet: true, Workers: 1})
		c.set(x)
		x.Link(twoReceivers)
		_, err := x.execute()
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: %v, want %q", c.name, err, c.want)
		}
	}
}

// A comparison of two receivers on the same frames: the second makes fewer errors.
func ExampleExperiment_Variants() {
	x := testExperiment("two receivers", &runner.Options{Quiet: true, Workers: 2})
	x.Sweep("ebn0_db", 3)
	x.Variants("rx", "ref", "hot") // "ref" is the reference; the Link reads p.Label("rx")
	x.Link(twoReceivers)
	x.Stop(stop.Shown(), stop.Bits(1e6))
	r, _ := x.execute()
	c := r.Points[1].Paired
	fmt.Println(r.Points[1].Stop, c.Shown, c.Diff < 0)
	// Output: shown true true
}

// Shown and Within given together settle each comparison by either: the better variant is
// shown better, the identical one shown within ±20 %, and the point ends once both are, by
// "shown/within".
func TestVariantsSettledPerComparison(t *testing.T) {
	x := testExperiment("settled", &runner.Options{Quiet: true, Workers: 2})
	x.Sweep("ebn0_db", 3)
	x.Variants("rx", "ref", "hot", "same")
	x.Link(twoReceivers)
	x.Stop(stop.Shown(), stop.Within(0.2), stop.Bits(2e7))
	r, err := x.execute()
	if err != nil {
		t.Fatal(err)
	}
	hot, same := r.Points[1].Paired, r.Points[2].Paired
	if r.Points[0].Stop != "shown/within" || !hot.Shown || same.Shown || !(same.RatioLow >= 0.8 && same.RatioHigh <= 1.2) {
		t.Fatalf("stop %q; hot %+v; same %+v", r.Points[0].Stop, hot, same)
	}
}

// Variants that must send the same bits are rounded to one frame length together: QPSK and
// 8-PSK from source.Random(1000) both run 1002-bit frames (3 | 1002 and 2 | 1002: common
// practice, no source), where rounding each on its own would give 1000 and 1002 and the pair
// would be refused.
func TestVariantsRoundedTogether(t *testing.T) {
	x := testExperiment("rounded", &runner.Options{Quiet: true, Workers: 1})
	x.Sweep("ebn0_db", 6)
	x.Variants("modem", "QPSK", "8-PSK")
	x.Link(func(p Point) *link.Link {
		m := modem.QPSK()
		if p.Label("modem") == "8-PSK" {
			m = modem.PSK(8)
		}
		return link.Chain(source.Random(1000), m.Mod(), channel.AWGN(p.Get("ebn0_db")), m.Demod())
	})
	x.Stop(stop.Frames(10))
	r, err := x.execute()
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range r.Points {
		if p.Taps[0].Trials != 10*1002 {
			t.Errorf("%v: %d bits in 10 frames, want 10 frames of 1002", p.Values, p.Taps[0].Trials)
		}
	}
}

// A paired run checks the taps its declarations name as a plain run does: a misspelt Show is
// refused at the first compared point.
func TestVariantsCheckNamedTaps(t *testing.T) {
	x := testExperiment("named", &runner.Options{Quiet: true, Workers: 1})
	x.Sweep("ebn0_db", 3)
	x.Variants("rx", "ref", "hot")
	x.Link(twoReceivers)
	x.Stop(stop.Frames(5))
	x.Show("paylod")
	if _, err := x.execute(); err == nil || !strings.Contains(err.Error(), `sim.Show: the link counts no tap "paylod"`) {
		t.Fatalf("err %v: want the misspelt tap refused", err)
	}
}
