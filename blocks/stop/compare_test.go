package stop_test

import (
	"fmt"
	"testing"

	"tally/blocks/rng"
	"tally/blocks/stats"
	"tally/blocks/stop"
)

// paired sums frames of two variants on common noise: in each of frames frames of 1000 bits,
// A has Poisson-like errors around meanA and B the same errors plus extra (B worse), minus
// fewer (B better), drawn from a fixed stream.
func paired(frames int, meanA float64, extra, fewer float64) stats.PairedTally {
	var t stats.PairedTally
	s := rng.New(9)
	for range frames {
		var a, onlyA, onlyB int64
		for range 1000 {
			u := s.Float64()
			switch {
			case u < meanA/1000*(1-fewer):
				a++ // wrong in both
			case u < meanA/1000:
				a++
				onlyA++ // wrong in A only
			case u < (meanA+extra)/1000:
				onlyB++ // wrong in B only
			}
		}
		t.Add(a, a-onlyA+onlyB, 1000, 1000, onlyA, onlyB)
	}
	return t
}

// Shown and Within decide on the comparison exactly as stats.ComparePaired reports it (the
// statistics' own checks against published sources are in blocks/stats), for every variant's
// comparison at once, and never on a point without one.
func TestComparisonRules(t *testing.T) {
	worse := paired(400, 5, 1.5, 0) // B makes 30 % more errors, on the same noise
	same := paired(400, 5, 0.05, 0.01)
	for _, c := range []struct {
		name  string
		pairs []stats.PairedTally
		rule  stop.Rule
	}{
		{"shown, worse", []stats.PairedTally{worse}, stop.Shown()},
		{"shown, same", []stats.PairedTally{same}, stop.Shown()},
		{"shown, both", []stats.PairedTally{worse, same}, stop.Shown()},
		{"within 10 %, worse", []stats.PairedTally{worse}, stop.Within(0.1)},
		{"within 10 %, same", []stats.PairedTally{same}, stop.Within(0.1)},
		{"within 50 %", []stats.PairedTally{worse}, stop.Within(0.5)},
		{"within 50 %, both", []stats.PairedTally{worse, same}, stop.Within(0.5)},
	} {
		want := true
		for _, p := range c.pairs {
			cmp := stats.ComparePaired(p, stop.DefaultConfidence)
			switch r := c.rule.(type) {
			case *stop.DiffShown:
				want = want && cmp.Shown
			case *stop.RatioWithin:
				want = want && cmp.RatioLow >= 1-r.Fraction && cmp.RatioHigh <= 1+r.Fraction
			}
		}
		got := c.rule.Met(&stop.Progress{Frames: 400, Pairs: c.pairs})
		if got != want {
			t.Errorf("%s: met %v, the comparison says %v", c.name, got, want)
		}
		if c.rule.Met(&stop.Progress{Frames: 400}) {
			t.Errorf("%s: met on a point with no comparison", c.name)
		}
	}
	if !stop.Shown().Met(&stop.Progress{Pairs: []stats.PairedTally{worse}}) {
		t.Error("30 % more errors over 400 000 paired bits is not shown")
	}
	if stop.Shown().Met(&stop.Progress{Pairs: []stats.PairedTally{same}}) {
		t.Error("1 % more errors over 400 000 paired bits is shown")
	}
	if stop.Within(0.1).Met(&stop.Progress{Pairs: []stats.PairedTally{worse}}) {
		t.Error("30 % more errors shown within ±10 %")
	}
	if !stop.Within(0.1).Met(&stop.Progress{Pairs: []stats.PairedTally{same}}) {
		t.Error("1 % more errors over 400 000 paired bits not shown within ±10 %")
	}
	if stop.Within(0).Err() == nil || stop.Within(1).Err() == nil || stop.Shown().Level(1).Err() == nil {
		t.Error("a fraction or confidence out of range was accepted")
	}
}

func ExampleShown() {
	// A paired point: the variant makes 30 % more errors on the same frames as the reference.
	p := &stop.Progress{Frames: 400, Pairs: []stats.PairedTally{paired(400, 5, 1.5, 0)}}
	fmt.Println(stop.Shown().Name(), stop.Shown().Met(p), stop.Within(0.1).Met(p))
	// Output: shown true false
}
