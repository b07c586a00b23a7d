package progress

import (
	"bytes"
	"fmt"
	"os"
	"strings"
	"testing"
	"time"

	"tally/blocks/link"
	"tally/blocks/stats"
	"tally/blocks/stop"
	"tally/runtime/result"
)

func prog(bits, errs int64, elapsed time.Duration) *stop.Progress {
	return &stop.Progress{Frames: bits / 1000, Taps: []string{link.TapBER, link.TapFER},
		Counts: []link.Tally{{Trials: bits, Errors: errs}, {Trials: bits / 1000, Errors: errs / 2}}, Elapsed: elapsed}
}

// Time left is the nearest rule's remaining count over its rate so far (arithmetic from the
// definition): 50 of 100 errors in 2 s leaves 2 s; 1e6 of 1e7 bits in 2 s leaves 18 s.
func TestLeft(t *testing.T) {
	p := prog(1e6, 50, 2*time.Second)
	for _, c := range []struct {
		rules []stop.Rule
		want  time.Duration
		ok    bool
	}{
		{[]stop.Rule{stop.Errors(100)}, 2 * time.Second, true},
		{[]stop.Rule{stop.Bits(1e7)}, 18 * time.Second, true},
		{[]stop.Rule{stop.Errors(100), stop.Bits(1e7)}, 2 * time.Second, true},
		{[]stop.Rule{stop.Errors(1000), stop.Bits(1e7)}, 18 * time.Second, true},
		{[]stop.Rule{stop.Time(5 * time.Second)}, 3 * time.Second, true},
		{[]stop.Rule{stop.Errors(100).Tap(link.TapFER)}, 6 * time.Second, true}, // 25 of 100 frame errors
		{[]stop.Rule{stop.Precision(1.5)}, 0, false},
		// All waits for its slowest rule: 1000 of 4000 frames in 2 s leaves 6 s.
		{[]stop.Rule{stop.All(stop.Errors(100), stop.Frames(4000))}, 6 * time.Second, true},
		{[]stop.Rule{stop.All(stop.Errors(100), stop.Frames(1000)), stop.Bits(1e7)}, 2 * time.Second, true},
		{[]stop.Rule{stop.All(stop.Errors(100), stop.Precision(1.5))}, 0, false},
	} {
		got, ok := Left(c.rules, p)
		if ok != c.ok || (ok && (got-c.want).Abs() > time.Millisecond) {
			t.Errorf("Left(%v) = %v, %v; want %v, %v", c.rules, got, ok, c.want, c.ok)
		}
	}
	if _, ok := Left([]stop.Rule{stop.Errors(100)}, prog(1e6, 0, time.Second)); ok {
		t.Error("no errors yet: the time to 100 errors cannot be told")
	}
}

func TestLive(t *testing.T) {
	p := Point{Label: "ebn0_db=4", Index: 2, Total: 6, Rules: []stop.Rule{stop.Errors(100), stop.Bits(1e7)}}
	s := Live(p, prog(1.23e6, 57, time.Second))
	e, _ := stats.ClopperPearson(57, 1.23e6, 0.95)
	for _, want := range []string{"[3/6] ebn0_db=4", "errors 57/100", "bits 1.23M/10M", "1.2 Mbit/s", "left",
		"ber " + short(e.Rate) + " [" + short(e.Low) + ", " + short(e.High) + "]"} {
		if !strings.Contains(s, want) {
			t.Errorf("live line %q lacks %q", s, want)
		}
	}
}

// A point just started (no frame committed yet) says so, with no counts or rates of nothing.
func TestLiveStarting(t *testing.T) {
	p := Point{Label: "ebn0_db=4", Index: 2, Total: 6, Rules: []stop.Rule{stop.Errors(100)}}
	pr := &stop.Progress{Taps: []string{link.TapBER}, Counts: make([]link.Tally, 1), Elapsed: time.Millisecond}
	if s := Live(p, pr); s != "[3/6] ebn0_db=4  starting" {
		t.Errorf("live line at the start %q", s)
	}
}

// The error count inside All is the goal the line shows.
func TestLiveAllGoal(t *testing.T) {
	p := Point{Label: "ebn0_db=4", Index: 2, Total: 6, Rules: []stop.Rule{stop.All(stop.Errors(100), stop.Frames(20)), stop.Bits(1e7)}}
	if s := Live(p, prog(1.23e6, 57, time.Second)); !strings.Contains(s, "errors 57/100") || !strings.Contains(s, "bits 1.23M/10M") {
		t.Errorf("live line %q lacks errors 57/100 or bits 1.23M/10M", s)
	}
}

func short(v float64) string { return fmt.Sprintf("%.3g", v) }

// The live line is drawn in place (carriage return, erase to end of line), cut to the width,
// and erased on Close.
func TestLineRedrawsInPlace(t *testing.T) {
	t.Setenv("COLUMNS", "40")
	var b bytes.Buffer
	l := NewLine(&b, Point{Label: "ebn0_db=4", Total: 1, Rules: []stop.Rule{stop.Errors(100)}})
	l.Update(prog(1e6, 10, time.Second))
	out := b.String()
	if !strings.HasPrefix(out, "\r") || !strings.HasSuffix(out, "\x1b[K") {
		t.Errorf("update %q is not drawn in place", out)
	}
	if n := len([]rune(strings.TrimSuffix(strings.TrimPrefix(out, "\r"), "\x1b[K"))); n > 39 {
		t.Errorf("line of %d columns on a 40-column terminal", n)
	}
	b.Reset()
	l.Close()
	if b.String() != "\r\x1b[K" {
		t.Errorf("Close wrote %q", b.String())
	}
	b.Reset()
	l.Close()
	if b.Len() != 0 {
		t.Error("a second Close wrote again")
	}
}

func TestTerminal(t *testing.T) {
	if Terminal(&bytes.Buffer{}) {
		t.Error("a buffer is not a terminal")
	}
	f, err := os.CreateTemp(t.TempDir(), "log")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	if Terminal(f) {
		t.Error("a regular file is not a terminal")
	}
}

func TestFinished(t *testing.T) {
	rp := result.Point{Stop: "errors", Seconds: 2.5, BitRate: 4e6,
		Taps: []result.Tap{{Name: "ber", Trials: 1e7, Errors: 100, Rate: 1e-5, Low: 8.1e-6, High: 1.2e-5}}}
	s := Finished("ebn0_db=8", rp)
	for _, want := range []string{"ebn0_db=8", "bits=10000000", "errors=100", "ber=1e-05 [8.1e-06, 1.2e-05]", "stop=errors", "4.0 Mbit/s", "2.5 s"} {
		if !strings.Contains(s, want) {
			t.Errorf("finished line %q lacks %q", s, want)
		}
	}
}

func TestUnits(t *testing.T) {
	for v, want := range map[float64]string{950: "950", 12345: "12.3k", 4.56e6: "4.56M", 1e9: "1G"} {
		if got := SI(v); got != want {
			t.Errorf("SI(%g) = %q, want %q", v, got, want)
		}
	}
	for d, want := range map[time.Duration]string{40 * time.Millisecond: "40 ms", 2500 * time.Millisecond: "2.5 s",
		42 * time.Second: "42 s", 185 * time.Second: "3 min 5 s", 7800 * time.Second: "2 h 10 min"} {
		if got := Duration(d); got != want {
			t.Errorf("Duration(%v) = %q, want %q", d, got, want)
		}
	}
}
