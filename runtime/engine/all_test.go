package engine

import (
	"context"
	"testing"

	"tally/blocks/link"
	"tally/blocks/rng"
	"tally/blocks/stop"
)

// stop.All(stop.Errors(n), stop.Frames(m)) ends a point at the first frame with n errors but
// not before frame m, for any number of workers, from any saved prefix (resume), in a replay
// (merge) and across shards. Both cases: errors reached before the minimum (the point ends at
// exactly m frames) and after it.
func TestAllRuleEverywhere(t *testing.T) {
	const p = 0.01 // 0.64 errors per 64-bit frame
	for _, c := range []struct {
		errs, min int64
		atMin     bool // the errors come before the minimum
	}{{10, 60, true}, {40, 20, false}} {
		rules := []stop.Rule{stop.All(stop.Errors(c.errs), stop.Frames(c.min)), stop.Bits(1e7)}
		frames, stopAt, rule := reference(t, p, rules, 4000)
		// The end computed from the frames alone: the later of the minimum and the first frame
		// whose prefix holds errs errors.
		var errs, first int64
		for f, fc := range frames {
			if errs += fc[0].Errors; errs >= c.errs {
				first = int64(f) + 1
				break
			}
		}
		if want := max(first, c.min); stopAt != want || rule != "all(errors,frames)" {
			t.Fatalf("%+v: reference ends at %d (%s), want %d (all(errors,frames))", c, stopAt, rule, want)
		}
		if (stopAt == c.min) != c.atMin {
			t.Fatalf("%+v: ends at %d, not the case meant", c, stopAt)
		}
		want := sum(frames, stopAt)
		check := func(what string, out Outcome, err error) {
			t.Helper()
			if err != nil {
				t.Fatal(err)
			}
			if out.Frames != stopAt || out.Stop != rule || !equal(out.Counts, want) {
				t.Errorf("%+v %s: %d frames, stop %q; want %d, %q", c, what, out.Frames, out.Stop, stopAt, rule)
			}
		}
		build := testLink(p)
		for _, w := range []int{1, 2, 7} {
			out, err := Run(context.Background(), Spec{Point: testPoint, Build: build, Rules: rules, Seed: testSeed, Workers: w})
			check("workers", out, err)
		}
		for _, k := range []int64{1, stopAt - 1, stopAt} {
			out, err := Run(context.Background(), Spec{Point: testPoint, Build: build, Rules: rules, Seed: testSeed, Workers: 3,
				Start: &State{Frames: k, Counts: sum(frames, k)}})
			check("resume", out, err)
		}
		rp := func(f int64) ([]link.Tally, bool) {
			if f >= int64(len(frames)) {
				return nil, false
			}
			return frames[f], true
		}
		out, err := Run(context.Background(), Spec{Point: testPoint, Build: build, Rules: rules, Seed: testSeed, Replay: rp})
		check("replay", out, err)
		// Shards judge an estimate that errs low, so together they cover the point's end.
		const of = 3
		covered := int64(-1)
		for i := 0; i < of; i++ {
			out, err := Run(context.Background(), Spec{Point: testPoint, Build: build, Rules: rules, Seed: testSeed, Workers: 2,
				Shard: &Shard{Index: i, Of: of}})
			if err != nil {
				t.Fatal(err)
			}
			if n := out.Frames*of + int64(i); covered < 0 || n < covered {
				covered = n
			}
		}
		if covered < stopAt {
			t.Errorf("%+v: shards cover %d frames, the point needs %d", c, covered, stopAt)
		}
	}
}

// A block failing on several frames is reported at the first of them in frame order, as a
// serial run reports it, whatever the number of workers; points and frames are numbered from
// 0 as the script sees them (Spec.Point, link.Frame.Index).
func TestFirstFailingFrameReported(t *testing.T) {
	build := func() (*link.Link, error) {
		l, _ := bscLink(0.01, true)()
		bad := link.Func("bad", func(f *link.Frame, _ *rng.Stream) {
			if f.Index == 5 || f.Index == 9 || f.Index > 12 {
				var s []int
				_ = s[f.Index]
			}
		})
		return link.Chain(append(l.Blocks(), bad)...), nil
	}
	for _, w := range []int{1, 3, 7} {
		_, err := Run(context.Background(), Spec{Point: 2, Label: "ebn0_db=4", Build: build,
			Rules: []stop.Rule{stop.Bits(1e6)}, Seed: testSeed, Workers: w})
		want := "point 2 (ebn0_db=4), frame 5: panic: runtime error: index out of range [5] with length 0"
		if err == nil || err.Error() != want {
			t.Errorf("workers %d: %v, want %q", w, err, want)
		}
	}
}
