package stop_test

import (
	"fmt"
	"math"
	"strings"
	"testing"
	"time"

	"tally/blocks/link"
	"tally/blocks/stop"
)

// at is a committed state with the BER tap at (errors, bits) and the FER tap at (ferrs, frames).
func at(errors, bits, ferrs, frames int64) *stop.Progress {
	// The errors spread over the frames as evenly as they go.
	var sq int64
	if frames > 0 {
		q, r := errors/frames, errors%frames
		sq = r*(q+1)*(q+1) + (frames-r)*q*q
	}
	return &stop.Progress{
		Frames: frames,
		Taps:   []string{link.TapBER, link.TapFER},
		Counts: []link.Tally{{Trials: bits, Errors: errors, Frames: frames, Squares: sq},
			{Trials: frames, Errors: ferrs, Frames: frames, Squares: ferrs}},
	}
}

func ExampleErrors() {
	r := stop.Errors(100).Tap(link.TapFER)
	fmt.Println(r.Name(), r.Met(at(500, 1e6, 99, 250)), r.Met(at(510, 1e6, 100, 251)))
	// Output: fer_errors false true
}

func ExampleTime() {
	r := stop.Time(10 * time.Minute)
	p := at(0, 1e6, 0, 250)
	p.Elapsed = 11 * time.Minute
	fmt.Println(r.Name(), r.Met(p))
	// Output: time true
}

// At 95 % the interval of 10 errors spans about 0.5× to 2× the rate (High/Low ≈ 3.8) and of
// 100 errors about 0.8× to 1.2× (≈ 1.5): common practice, no source.
func ExamplePrecision() {
	r := stop.Precision(1.5)
	fmt.Println(r.Name(), r.Met(at(10, 1e6, 10, 250)), r.Met(at(100, 1e7, 100, 2500)))
	// Output: precision false true
}

// With no errors a claim below 1e-6 comes after about 4.2e6 bits: more than the 3e6 a single
// look needs (the rule of three; Hanley and Lippman-Hand, JAMA 249, 1983), the price of a
// claim that stays valid however often it is judged.
func ExampleBelow() {
	// No errors in 1000-bit frames: shown below 1e-3 after about 3.7/1e-3 frames, whatever
	// the clustering might have been.
	r := stop.Below(1e-3)
	fmt.Println(r.Name(), r.Met(at(0, 3.6e6, 0, 3600)), r.Met(at(0, 3.8e6, 0, 3800)))
	// Output: below false true
}

func ExampleAbove() {
	r := stop.Above(1e-3).Tap(link.TapFER)
	fmt.Println(r.Name(), r.Met(at(0, 1e6, 0, 0)), r.Met(at(50, 1e7, 35, 10000)))
	// Output: fer_above false true
}

// Garwood's exact Poisson limits at 95 % (Garwood, Biometrika 28, 1936; values from memory):
// 9 events → [4.12, 17.08], ratio 4.15; 10 events → [4.80, 18.39], ratio 3.83. With many bits
// (the Poisson regime) Precision(4) is therefore first met at the 10th error.
func TestPrecisionFirstMetAtGarwoodCount(t *testing.T) {
	r := stop.Precision(4)
	first := int64(-1)
	for k := int64(1); k <= 20; k++ {
		if r.Met(at(k, 1e8, k, 1e4)) {
			first = k
			break
		}
	}
	if first != 10 {
		t.Errorf("Precision(4) first met at %d errors, want 10", first)
	}
}

// The rules that judge an interval or weigh evidence must not judge a state with no trials:
// the interval of 0 of 0 is [0, 1] and no trial is no evidence. The settings are the easiest
// to meet: a ratio just above 1 or huge, targets next to 0 and 1.
func TestNoJudgementOnZeroBits(t *testing.T) {
	rules := []stop.Rule{
		stop.Precision(1.0000001), stop.Precision(1e300),
		stop.Below(0.999999), stop.Below(0.5).Tap(link.TapFER),
		stop.Above(1e-300), stop.Above(1e-300).Tap(link.TapFER),
		stop.Below(0.5).Tap("missing"), stop.Precision(2).Tap("missing"),
	}
	states := []*stop.Progress{
		at(0, 0, 0, 0),
		{}, // no taps at all
	}
	for _, r := range rules {
		for i, p := range states {
			if r.Met(p) {
				t.Errorf("%s met on empty state %d", r.Name(), i)
			}
		}
	}
	// And they do judge once there is something: 20 frames of 4096 bits with 10 errors each.
	// (One frame cannot show a rate above anything at 95 % when errors may cluster: by
	// Markov's inequality a single frame holds that share of errors with probability up to
	// the target over the share.)
	if !stop.Above(1e-3).Met(at(200, 20*4096, 20, 20)) {
		t.Error("Above(1e-3) not met with 200 errors in 20 frames of 4096 bits")
	}
}

func TestNames(t *testing.T) {
	for _, c := range []struct {
		r    stop.Rule
		want string
	}{
		{stop.Errors(10), "errors"}, {stop.Bits(1e9), "bits"}, {stop.Time(time.Second), "time"},
		{stop.Precision(2), "precision"}, {stop.Below(1e-6), "below"}, {stop.Above(1e-2), "above"},
		{stop.Precision(2).Tap("fer"), "fer_precision"}, {stop.Below(1e-3).Tap("pre"), "pre_below"},
		{stop.Above(1e-3).Tap("fer"), "fer_above"},
	} {
		if got := c.r.Name(); got != c.want {
			t.Errorf("Name() = %q, want %q", got, c.want)
		}
	}
}

func TestErr(t *testing.T) {
	nan := math.NaN()
	for _, c := range []struct {
		rule link.Checked
		want string // start of the message: rule and parameter
	}{
		{stop.Time(0), "stop.Time: budget 0s"},
		{stop.Precision(1), "stop.Precision: ratio 1 "},
		{stop.Precision(-3), "stop.Precision: ratio -3 "},
		{stop.Precision(nan), "stop.Precision: ratio NaN"},
		{stop.Precision(math.Inf(1)), "stop.Precision: ratio +Inf"},
		{stop.Precision(2).Level(1), "stop.Precision: confidence 1 "},
		{stop.Below(0), "stop.Below: target 0 "},
		{stop.Below(nan), "stop.Below: target NaN"},
		{stop.Below(1e-6).Level(nan), "stop.Below: confidence NaN"},
		{stop.Above(1), "stop.Above: target 1 "},
		{&stop.WidthRatio{Ratio: 2, Confidence: 0.9, Method: "wald"}, "stop.Precision: unknown interval method \"wald\""},
		{stop.Above(0.1).Level(0), "stop.Above: confidence 0 "},
		{stop.Floor(-1), "stop.Floor: target -1 "},
		{stop.Budget(0), "stop.Budget: budget 0 "},
		{stop.Budget(math.Inf(1)), "stop.Budget: budget +Inf"},
		{stop.Budget(1e9).For(0), "stop.Budget: errors 0 "},
		{stop.Errors(0), "stop.Errors: count 0 "},
		{stop.Bits(0.5), "stop.Bits: cap 0 "},
	} {
		if err := c.rule.Err(); err == nil || !strings.HasPrefix(err.Error(), c.want) {
			t.Errorf("want an error starting %q, got %v", c.want, err)
		}
	}
	for _, c := range []link.Checked{stop.Time(time.Minute), stop.Precision(1.2), stop.Below(1e-9).Level(0.99),
		stop.Above(0.5), stop.Floor(1e-9), stop.Budget(1e10).For(10), stop.Errors(1), stop.Bits(1)} {
		if err := c.Err(); err != nil {
			t.Errorf("unexpected error %v", err)
		}
	}
}
