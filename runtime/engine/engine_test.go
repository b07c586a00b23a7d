package engine

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"
	"time"

	"gonum.org/v1/gonum/stat/distuv"

	"tally/blocks/link"
	"tally/blocks/rng"
	"tally/blocks/stats"
	"tally/blocks/stop"
)

const (
	testSeed  = 7
	testPoint = 2
	frameBits = 64
)

// testLink is a binary symmetric channel with crossover p on frameBits random bits, whose
// frames take uneven times (a sleep drawn from the frame's stream), so that on several workers
// they finish out of order.
func testLink(p float64) func() (*link.Link, error) { return bscLink(p, true) }

// bscLink is testLink, without the sleeps when slow is false (same counts: the sleep block
// draws from its own stream).
func bscLink(p float64, slow bool) func() (*link.Link, error) {
	return func() (*link.Link, error) {
		var bits, hard []byte
		src := link.Func("src", func(f *link.Frame, r *rng.Stream) {
			bits = link.GrowBytes(bits, frameBits)
			r.Bits(bits)
			f.Bits, f.Coded = bits, bits
		})
		bsc := link.Func("bsc", func(f *link.Frame, r *rng.Stream) {
			hard = link.GrowBytes(hard, len(f.Bits))
			for i, b := range f.Bits {
				if r.Float64() < p {
					b ^= 1
				}
				hard[i] = b
			}
			f.Hard = hard
		})
		delay := link.Func("slow", func(f *link.Frame, r *rng.Stream) {
			if r.IntN(4) == 0 && slow {
				time.Sleep(time.Duration(r.IntN(300)) * time.Microsecond)
			}
		})
		return link.Chain(src, bsc, delay), nil
	}
}

// reference computes frames one after another with link.Run, the definition the engine must
// reproduce: per-frame counts and the first prefix meeting a rule.
func reference(t *testing.T, crossover float64, rules []stop.Rule, max int64) (frames [][]link.Tally, stopAt int64, rule string) {
	t.Helper()
	l, _ := bscLink(crossover, false)()
	p := &stop.Progress{Taps: l.Taps(), Counts: make([]link.Tally, len(l.Taps()))}
	var f link.Frame
	for i := int64(0); i < max; i++ {
		c := make([]link.Tally, len(p.Taps))
		if err := l.Run(&f, testSeed, testPoint, int(i), c); err != nil {
			t.Fatal(err)
		}
		frames = append(frames, c)
		if rule != "" {
			continue
		}
		for k := range c {
			p.Counts[k].Trials += c[k].Trials
			p.Counts[k].Errors += c[k].Errors
			p.Counts[k].Frames++
			p.Counts[k].Squares += c[k].Errors * c[k].Errors
		}
		p.Frames++
		for _, r := range rules {
			if r.Met(p) {
				stopAt, rule = p.Frames, r.Name()
				break
			}
		}
	}
	if rule == "" {
		t.Fatalf("reference: no rule met within %d frames", max)
	}
	return frames, stopAt, rule
}

func sum(frames [][]link.Tally, n int64) []link.Tally {
	s := make([]link.Tally, len(frames[0]))
	for _, c := range frames[:n] {
		for k := range c {
			s[k].Trials += c[k].Trials
			s[k].Errors += c[k].Errors
			s[k].Frames++
			s[k].Squares += c[k].Errors * c[k].Errors
		}
	}
	return s
}

func equal(a, b []link.Tally) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

// prefixRule is met after n frame errors; it also checks that what it is shown is a prefix
// of the reference: the counts of frames 0..Frames-1, none missing, none ahead.
type prefixRule struct {
	t      *testing.T
	frames [][]link.Tally
	n      int64
}

func (r *prefixRule) Met(p *stop.Progress) bool {
	if r.frames == nil {
		return p.Counts[1].Errors >= r.n
	}
	if p.Frames > int64(len(r.frames)) || !equal(p.Counts, sum(r.frames, p.Frames)) {
		r.t.Errorf("rule shown %d frames with counts %v: not the prefix of the reference", p.Frames, p.Counts)
	}
	return p.Counts[1].Errors >= r.n
}

func (r *prefixRule) Name() string { return "frame_errors" }

// The counts and stop of a point are the same for any number of workers, and are those of
// the prefix computed one frame after another (the engine contract, design.md).
func TestWorkersAgree(t *testing.T) {
	build := testLink(0.01)
	rules := []stop.Rule{stop.Errors(60), stop.Bits(1e6)}
	frames, stopAt, rule := reference(t, 0.01, rules, 2000)
	pr := &prefixRule{t: t, frames: frames, n: 1 << 40}
	for _, w := range []int{1, 2, 7} {
		out, err := Run(context.Background(), Spec{Point: testPoint, Build: build, Rules: append([]stop.Rule{pr}, rules...), Seed: testSeed, Workers: w})
		if err != nil {
			t.Fatal(err)
		}
		if out.Frames != stopAt || out.Stop != rule || !equal(out.Counts, sum(frames, stopAt)) {
			t.Errorf("workers %d: %d frames, stop %q, counts %v; reference %d frames, stop %q, counts %v",
				w, out.Frames, out.Stop, out.Counts, stopAt, rule, sum(frames, stopAt))
		}
	}
}

// A rule is judged on the committed prefix only: with frames finishing out of order on seven
// workers, every state the rule sees is a prefix, and the point ends at the first prefix that
// meets it.
func TestRuleJudgedOnPrefix(t *testing.T) {
	build := testLink(0.02)
	pr := &prefixRule{t: t, n: 25}
	frames, stopAt, _ := reference(t, 0.02, []stop.Rule{pr}, 3000)
	pr.frames = frames
	out, err := Run(context.Background(), Spec{Point: testPoint, Build: build, Rules: []stop.Rule{pr}, Seed: testSeed, Workers: 7})
	if err != nil {
		t.Fatal(err)
	}
	if out.Frames != stopAt || out.Stop != "frame_errors" {
		t.Errorf("stopped after %d frames (%s), the prefix meets the rule first at %d", out.Frames, out.Stop, stopAt)
	}
}

// Continuing from a saved prefix (resume) gives the uninterrupted outcome, computing only the
// frames after it; a finished point given back its final state ends at once, for the same rule.
func TestStartContinues(t *testing.T) {
	build := testLink(0.01)
	rules := []stop.Rule{stop.Errors(40), stop.Bits(1e6)}
	frames, stopAt, rule := reference(t, 0.01, rules, 2000)
	for _, k := range []int64{0, 1, stopAt / 2, stopAt - 1, stopAt} {
		st := &State{Frames: k, Counts: sum(frames, k)}
		out, err := Run(context.Background(), Spec{Point: testPoint, Build: build, Rules: rules, Seed: testSeed, Workers: 3, Start: st})
		if err != nil {
			t.Fatal(err)
		}
		if out.Frames != stopAt || out.Stop != rule || !equal(out.Counts, sum(frames, stopAt)) || out.Computed != stopAt-k {
			t.Errorf("start %d: %d frames (%d computed), stop %q; want %d frames (%d computed), stop %q",
				k, out.Frames, out.Computed, out.Stop, stopAt, stopAt-k, rule)
		}
	}
}

// A shard computes exactly the frames f ≡ Index (mod Of), in order, with the counts those
// frames have in a single run.
func TestShardFrames(t *testing.T) {
	build := testLink(0.01)
	rules := []stop.Rule{stop.Errors(50), stop.Bits(1e6)}
	frames, stopAt, _ := reference(t, 0.01, rules, 3000)
	const of = 3
	covered := int64(-1)
	for i := 0; i < of; i++ {
		var got []int64
		spec := Spec{Point: testPoint, Build: build, Rules: rules, Seed: testSeed, Workers: 4, Shard: &Shard{Index: i, Of: of}}
		spec.Observers = []Observer{onCommit(func(f int64, c []link.Tally) {
			if f < int64(len(frames)) && !equal(c, frames[f]) {
				t.Errorf("shard %d frame %d: counts %v, single run %v", i, f, c, frames[f])
			}
			got = append(got, f)
		})}
		out, err := Run(context.Background(), spec)
		if err != nil {
			t.Fatal(err)
		}
		for n, f := range got {
			if f != int64(n*of+i) {
				t.Fatalf("shard %d/%d: its %d-th frame is %d, want %d", i, of, n, f, n*of+i)
			}
		}
		if out.Frames != int64(len(got)) {
			t.Errorf("shard %d: outcome says %d frames, committed %d", i, out.Frames, len(got))
		}
		if c := out.Frames*of + int64(i); covered < 0 || c < covered {
			covered = c
		}
	}
	// The estimate errs low, so the shards together cover the single run's stop.
	if covered < stopAt {
		t.Errorf("shards cover a prefix of %d frames, the point needs %d", covered, stopAt)
	}
}

// A shard goes on to Min of its own frames even when the estimate is met earlier.
func TestShardMin(t *testing.T) {
	out, err := Run(context.Background(), Spec{Point: testPoint, Build: testLink(0.2), Rules: []stop.Rule{stop.Errors(10)},
		Seed: testSeed, Workers: 2, Shard: &Shard{Index: 1, Of: 2, Min: 37}})
	if err != nil {
		t.Fatal(err)
	}
	if out.Frames != 37 || out.Stop != "errors" {
		t.Errorf("%d frames, stop %q; want 37, errors", out.Frames, out.Stop)
	}
}

// Replaying a single run's frame counts reaches the same outcome; replaying too few frames
// ends Short with all of them committed.
func TestReplay(t *testing.T) {
	build := testLink(0.01)
	rules := []stop.Rule{stop.Errors(40), stop.Bits(1e6)}
	frames, stopAt, rule := reference(t, 0.01, rules, 2000)
	for _, have := range []int64{int64(len(frames)), stopAt, stopAt - 1} {
		rp := func(f int64) ([]link.Tally, bool) {
			if f >= have {
				return nil, false
			}
			return frames[f], true
		}
		out, err := Run(context.Background(), Spec{Point: testPoint, Build: build, Rules: rules, Seed: testSeed, Replay: rp})
		if err != nil {
			t.Fatal(err)
		}
		wantFrames, wantStop := stopAt, rule
		if have < stopAt {
			wantFrames, wantStop = have, Short
		}
		if out.Frames != wantFrames || out.Stop != wantStop || !equal(out.Counts, sum(frames, wantFrames)) || out.Computed != 0 {
			t.Errorf("replay of %d frames: %d frames, stop %q; want %d, %q", have, out.Frames, out.Stop, wantFrames, wantStop)
		}
	}
}

// With one shard the estimate is the count itself.
func TestEstimateOneShard(t *testing.T) {
	own := &stop.Progress{Frames: 9, Taps: []string{"ber"}, Counts: []link.Tally{{Trials: 900, Errors: 17}}}
	var est stop.Progress
	Shard{Of: 1}.Estimate(own, &est)
	if est.Frames != 9 || est.Counts[0] != own.Counts[0] {
		t.Errorf("estimate of one shard %+v, want the count %+v", est, own)
	}
}

// The estimate errs low about as rarely as Margin promises: with Poisson error counts in each
// of four shards (the rare-error limit of the binomial), the estimate from shard 0 exceeds the
// true total in well under 1 % of trials (the margin for 4 shards is the normal quantile at
// 1 − 0.01/4, 2.81σ, a one-sided tail of 0.25 %; Abramowitz & Stegun, Handbook of Mathematical
// Functions, 1964, table 26.1).
func TestEstimateErrsLow(t *testing.T) {
	const of, trials = 4, 20000
	for _, mean := range []float64{5, 25, 100} {
		src := rand.NewPCG(11, uint64(mean))
		pois := distuv.Poisson{Lambda: mean, Src: src}
		over := 0
		for n := 0; n < trials; n++ {
			var total int64
			own := int64(pois.Rand())
			total += own
			for k := 1; k < of; k++ {
				total += int64(pois.Rand())
			}
			var est stop.Progress
			Shard{Index: 0, Of: of}.Estimate(&stop.Progress{Counts: []link.Tally{{Errors: own}}}, &est)
			if est.Counts[0].Errors > total {
				over++
			}
		}
		if frac := float64(over) / trials; frac > 0.01 {
			t.Errorf("mean %v per shard: the estimate exceeds the total in %.2f %% of trials", mean, 100*frac)
		}
	}
}

// onCommit is an Observer of commits only.
type onCommit func(frame int64, counts []link.Tally)

func (onCommit) Started([]string)                    {}
func (o onCommit) Committed(f int64, c []link.Tally) { o(f, c) }
func (onCommit) Progress(*stop.Progress)             {}
func (onCommit) Finished(Outcome)                    {}

// Bursts widen the estimate by the index of dispersion: the same 200 errors in 100 frames give a
// lower estimate when they fell 10 at a time in 20 frames than when spread 2 a frame, by
// z·sqrt(n(n−1)·e·D) with D from stats.Dispersion; and errors all in one frame give no
// estimate at all (their spread cannot be judged).
func TestEstimateDispersion(t *testing.T) {
	sh := Shard{Index: 0, Of: 8, Z: 3}
	spread := link.Tally{Trials: 100 * 1000, Errors: 200, Frames: 100, Squares: 100 * 2 * 2}
	bursty := link.Tally{Trials: 100 * 1000, Errors: 200, Frames: 100, Squares: 20 * 10 * 10}
	var a, b stop.Progress
	sh.Estimate(&stop.Progress{Frames: 100, Counts: []link.Tally{spread}}, &a)
	sh.Estimate(&stop.Progress{Frames: 100, Counts: []link.Tally{bursty}}, &b)
	for _, c := range []struct {
		got   stop.Progress
		tally link.Tally
	}{{a, spread}, {b, bursty}} {
		d := stats.Dispersion(c.tally)
		if !(d > 1) {
			d = 1
		}
		want := int64(math.Floor(8*200 - 3*math.Sqrt(8*7*200*d)))
		if c.got.Counts[0].Errors != want {
			t.Errorf("dispersion %.2f: estimate %d errors, want %d", d, c.got.Counts[0].Errors, want)
		}
	}
	if b.Counts[0].Errors >= a.Counts[0].Errors {
		t.Errorf("bursty errors estimated %d, spread ones %d: bursts must lower the estimate", b.Counts[0].Errors, a.Counts[0].Errors)
	}
	var one stop.Progress
	sh.Estimate(&stop.Progress{Frames: 1, Counts: []link.Tally{{Trials: 1000, Errors: 40, Frames: 1, Squares: 1600}}}, &one)
	if one.Counts[0].Errors != 0 {
		t.Errorf("errors of a single frame estimated %d, want 0", one.Counts[0].Errors)
	}
}

// The default margin is the normal quantile at 1 − 0.01/N: 2.575829 for 2 shards (upper 0.5 %
// point) and 3.090232 for 10 (upper 0.1 % point); Abramowitz & Stegun, Handbook of Mathematical
// Functions, 1964, table 26.5.
func TestMargin(t *testing.T) {
	for _, c := range []struct {
		of   int
		want float64
	}{{2, 2.575829}, {10, 3.090232}} {
		if got := Margin(c.of); math.Abs(got-c.want) > 1e-6 {
			t.Errorf("Margin(%d) = %.6f, want %.6f", c.of, got, c.want)
		}
	}
}
