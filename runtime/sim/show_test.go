package sim

import (
	"bytes"
	"fmt"
	"math"
	"slices"
	"strings"
	"testing"

	"tally/blocks/channel"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/rng"
	"tally/blocks/source"
	"tally/blocks/stop"
	"tally/plots"
	"tally/runtime/internal/runner"
	"tally/runtime/output"
)

// preamble is the unprotected head of payloadLink's frames.
const preamble = 128

// payloadLink is BPSK over AWGN in 2048-bit frames whose 128-bit preamble is flipped at 2 %
// besides the noise: the whole-frame BER has a floor of about 0.02·128/2048 = 1.25e-3, while
// the script's own "payload" tap (the 1920 bits after the preamble) sees the AWGN channel only.
func payloadLink(p Point) *link.Link {
	m := modem.BPSK()
	flip := link.Func("preamble_flips", func(f *link.Frame, r *rng.Stream) {
		for i := range preamble {
			if r.Float64() < 0.02 {
				f.Hard[i] ^= 1
			}
		}
	})
	l := link.Chain(source.Random(2048), m.Mod(), channel.AWGN(p.Get("ebn0_db")), m.Demod(), flip)
	return l.Count("payload", func(f *link.Frame) (int64, int64) {
		return int64(len(f.Bits) - preamble), link.CountErrors(f.Bits[preamble:], f.Hard[preamble:])
	})
}

// bpsk is the BER of coherent BPSK over AWGN, Q(√(2 Eb/N0)) (Proakis, Digital Communications,
// 4th ed., 2001, eq. 5.2-5).
func bpsk(db float64) float64 { return 0.5 * math.Erfc(math.Sqrt(math.Pow(10, db/10))) }

// The issue's case: a stop rule and a target on the script's own payload tap while the
// whole-frame BER has a floor. The run shows the payload tap by default: the summary's table
// holds its counts (its interval covers the BPSK closed form, the frame BER's does not), the
// plot draws it under its own name and the target line with the crossing, and the log line
// of each point counts it.
func TestShowsGoverningTap(t *testing.T) {
	var log bytes.Buffer
	x := testExperiment("payload", &runner.Options{Workers: 2, Log: &log})
	x.Sweep("ebn0_db", 4, 6, 8)
	x.Link(payloadLink)
	x.Stop(stop.Errors(60).Tap("payload"), stop.Bits(4e6))
	x.TargetOn("payload", 1e-3)
	r, err := x.execute()
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(r.Shown, []string{"payload"}) {
		t.Fatalf("shown %v, want [payload]", r.Shown)
	}
	ber, pay := r.TapIndex("ber"), r.TapIndex("payload")
	for _, p := range r.Points {
		want := bpsk(p.Values[0])
		if tp := p.Taps[pay]; !(tp.Low <= want && want <= tp.High) {
			t.Errorf("Eb/N0 %g dB: BPSK %.3g outside the payload interval [%.3g, %.3g]", p.Values[0], want, tp.Low, tp.High)
		}
		if tb := p.Taps[ber]; p.Values[0] == 8 && !(tb.Low > 3*want) {
			t.Errorf("Eb/N0 8 dB: the frame BER [%.3g, %.3g] shows no floor over BPSK %.3g", tb.Low, tb.High, want)
		}
	}
	sum := string(output.Summary(r, nil))
	p := r.Points[2].Taps[pay]
	row := fmt.Sprintf("| 8 | %d | %d | %s | [%s, %s] |", p.Trials, p.Errors, output.Num(p.Rate), output.Num(p.Low), output.Num(p.High))
	for _, want := range []string{"| ebn0_db | trials | errors | payload | interval | stop |", row, "The other taps (BER, FER) are in `table.csv`."} {
		if !strings.Contains(sum, want) {
			t.Errorf("README.md lacks %q:\n%s", want, sum)
		}
	}
	fig, err := plots.BER(r)
	if err != nil {
		t.Fatal(err)
	}
	svg, err := fig.SVG()
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Targets) != 1 || !r.Targets[0].Found {
		t.Fatalf("targets %+v: want the payload's crossing of 1e-3", r.Targets)
	}
	cross := fmt.Sprintf(">%.2f dB<", r.Targets[0].X)
	for _, want := range []string{">payload error rate<", ">simulated payload<", ">target 0.001<", cross} {
		if !bytes.Contains(svg, []byte(want)) {
			t.Errorf("ber.svg lacks %q", want)
		}
	}
	if bytes.Contains(svg, []byte(">simulated BER<")) {
		t.Error("ber.svg draws the whole-frame BER the script did not ask for")
	}
	if lines := strings.Split(strings.TrimSpace(log.String()), "\n"); len(lines) < 3 || !strings.Contains(lines[0], "payload_trials=") || !strings.Contains(lines[0], "stop=payload_errors") {
		t.Errorf("log %q: want each point's line on the payload tap", log.String())
	}
}

// What is shown without Show: the taps the rules judge, then the targets' taps, else the BER;
// with Show, the script's choice, the first governing.
func TestShownTaps(t *testing.T) {
	for _, c := range []struct {
		name string
		set  func(x *Experiment)
		want []string
	}{
		{"defaults", func(x *Experiment) {}, []string{"ber"}},
		{"bits only", func(x *Experiment) { x.Stop(stop.Bits(4096)) }, []string{"ber"}},
		{"target on fer", func(x *Experiment) { x.Stop(stop.Errors(1), stop.Bits(4096)); x.TargetOn("fer", 0.5) }, []string{"ber", "fer"}},
		{"all on payload", func(x *Experiment) {
			x.Stop(stop.All(stop.Errors(1).Tap("payload"), stop.Frames(2)), stop.Bits(4096))
		}, []string{"payload"}},
		{"show", func(x *Experiment) { x.Stop(stop.Errors(1).Tap("payload"), stop.Bits(4096)); x.Show("ber", "payload") }, []string{"ber", "payload"}},
	} {
		x := testExperiment("shown", &runner.Options{Quiet: true, Workers: 1})
		x.Sweep("ebn0_db", 0)
		x.Link(payloadLink)
		c.set(x)
		r, err := x.execute()
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		if !slices.Equal(r.Shown, c.want) {
			t.Errorf("%s: shown %v, want %v", c.name, r.Shown, c.want)
		}
	}
}

// A misspelt tap in Show is refused once the first point has run, naming the taps the link has.
func TestShowUnknownTap(t *testing.T) {
	x := testExperiment("shown", &runner.Options{Quiet: true, Workers: 1})
	x.Sweep("ebn0_db", 0, 1)
	x.Link(payloadLink)
	x.Stop(stop.Bits(4096))
	x.Show("paylod")
	_, err := x.execute()
	if err == nil || !strings.Contains(err.Error(), `sim.Show: the link counts no tap "paylod" (it counts ber, fer, payload)`) {
		t.Errorf("err %v, want the unknown tap named with the link's taps", err)
	}
}

// Show picks the taps the plot and README.md show; here the script's own payload tap, with
// the whole-frame BER beside it.
func ExampleExperiment_Show() {
	x := testExperiment("payload after a preamble", &runner.Options{Quiet: true, Workers: 1})
	x.Sweep("ebn0_db", 6)
	x.Link(payloadLink)
	x.Stop(stop.Errors(20).Tap("payload"), stop.Bits(1e6))
	x.Show("payload", "ber")
	r, _ := x.execute()
	fmt.Println(r.Shown)
	for _, line := range strings.Split(string(output.Summary(r, nil)), "\n") {
		if strings.HasPrefix(line, "| ebn0_db") {
			fmt.Println(line)
		}
	}
	// Output:
	// [payload ber]
	// | ebn0_db | payload trials | payload errors | payload | payload interval | BER bits | BER errors | BER | BER interval | stop |
}

// A sweep rule judges the tap it names: on payloadLink the whole-frame BER has a floor near
// 1.25e-3, so stop.Floor(1e-3) on the BER ends no curve, while on the payload tap (BPSK over
// AWGN, 7.7e-4 at 7 dB by Proakis eq. 5.2-5 — the formula of bpsk above) it skips the points
// after the first one shown below 1e-3; the reason names the tap.
func TestSweepRuleOnTap(t *testing.T) {
	for _, c := range []struct {
		floor   *stop.FloorRule
		skipped int
	}{
		{stop.Floor(1e-3), 0},
		{stop.Floor(1e-3).Tap("payload"), 1},
	} {
		x := testExperiment("floor", &runner.Options{Quiet: true, Workers: 2})
		x.Sweep("ebn0_db", 4, 7, 9)
		x.Link(payloadLink)
		x.Stop(stop.Errors(100).Tap("payload"), stop.Bits(2e6))
		x.StopSweep(c.floor)
		r, err := x.execute()
		if err != nil {
			t.Fatal(err)
		}
		n := 0
		for _, p := range r.Points {
			if p.Stop == "skipped" {
				n++
				if !strings.HasPrefix(p.Note, "payload: ") {
					t.Errorf("skipped with %q: want the tap named", p.Note)
				}
			}
		}
		if n != c.skipped {
			t.Errorf("floor on %q: %d points skipped, want %d (7 dB: payload BPSK %.2g)", stop.SweepTap(c.floor), n, c.skipped, bpsk(7))
		}
	}
}

// A tap a stop rule names that no link counts (a misspelt "paylod") is said, on the log at the
// first point and in the run's notes, instead of the rule silently never being met.
func TestNamedTapNoLinkCounts(t *testing.T) {
	var log bytes.Buffer
	x := testExperiment("typo", &runner.Options{Workers: 1, Log: &log})
	x.Sweep("ebn0_db", 4, 6)
	x.Link(payloadLink)
	x.Stop(stop.Errors(50).Tap("paylod"), stop.Bits(2e4))
	r, err := x.execute()
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range r.Points {
		if p.Stop != "bits" {
			t.Errorf("stop %q: a rule on a tap no link counts cannot be met", p.Stop)
		}
	}
	if !strings.Contains(log.String(), `sim.Stop names the tap "paylod", which the first point's link does not count (it counts ber, fer, payload)`) {
		t.Errorf("log lacks the warning:\n%s", log.String())
	}
	if !slices.ContainsFunc(r.Notes, func(n string) bool {
		return strings.Contains(n, `names the tap "paylod", which no link in the run counts`)
	}) {
		t.Errorf("notes %q lack the unknown tap", r.Notes)
	}
}
