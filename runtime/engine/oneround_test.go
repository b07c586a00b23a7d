package engine

import (
	"context"
	"fmt"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"

	"tally/blocks/channel"
	"tally/blocks/fec"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/pulse"
	"tally/blocks/source"
	"tally/blocks/stop"
)

// frameSource draws one frame's counts (one tap, "ber") for a simulated point.
type frameSource struct {
	name string
	bits int64                                // trials per frame
	draw func(r *rand.Rand) int64             // errors in a frame
	rule func() []stop.Rule                   // the point's stop rules
	make func(t *testing.T) ([]int64, string) // measures pool
	// capped: the overshoot for 8 shards apart is held below 1.5×. Only for independent
	// errors: with bursts, 100 errors are a few effective errors and a shard's own eighth of
	// them cannot predict where one machine stops; the figures are logged and in the README.
	capped bool
	// e100: the point stops at 100 errors; the overshoot of 8 shards that tell each other their
	// counts every frame is held below 1.5×, bursts or not.
	e100 bool
}

// oneRound is the outcome of simulated sharded runs of one source.
type oneRound struct {
	points, covered int
	computed, used  int64 // frames all shards computed, frames one machine did
}

// simulateShards runs one point as `of` shards would, with the real Shard.Estimate and stop
// rules deciding where each shard ends, and as one machine would, on the same frame sequence
// (frame f's counts are seq(f), as the counter-based streams make them in a real run). The
// point is covered in one round when every shard ran at least as far as the single run needs:
// the merge's Covered, min over shards of frames·of + index, reaches the single run's frames.
//
// every is how the shards tell each other their counts: 0, never (separate machines without a
// shared folder); n > 0, each shard tells its counts (Seen.Record) every n of its own frames and
// at its end, and reads what the others last told at the same moments, as a session does with
// its progress file. The shards run at different speeds (each computes a frame in a tick with a
// chance between 1/2 and 1, drawn from r), so a shard sees the others ahead of it or behind.
func simulateShards(seq func(f int64) link.Tally, rules []stop.Rule, of int, every int64, r *rand.Rand) (covered bool, computed, used int64) {
	met := func(p *stop.Progress) bool {
		for _, r := range rules {
			if r.Met(p) {
				return true
			}
		}
		return false
	}
	taps := []string{link.TapBER}
	one := &stop.Progress{Taps: taps, Counts: make([]link.Tally, 1)}
	for !met(one) {
		one.Counts[0].Add(seq(one.Frames))
		one.Frames++
	}
	used = one.Frames

	type shard struct {
		sh    Shard
		own   stop.Progress
		told  Seen
		speed float64
		done  bool
	}
	sh := make([]*shard, of)
	board := make([]Seen, of) // what each shard last told
	for i := range sh {
		sh[i] = &shard{sh: Shard{Index: i, Of: of}, own: stop.Progress{Taps: taps, Counts: make([]link.Tally, 1)},
			told: Seen{Index: i}, speed: 0.5 + r.Float64()/2}
	}
	tell := func(s *shard) {
		s.told.Record(s.own.Frames, s.own.Counts)
		board[s.sh.Index] = Seen{Index: s.sh.Index, Steps: append([]Step(nil), s.told.Steps...)}
		s.sh.Seen = s.sh.Seen[:0]
		for j, b := range board {
			if j != s.sh.Index && len(b.Steps) > 0 {
				s.sh.Seen = append(s.sh.Seen, b)
			}
		}
	}
	var est stop.Progress
	for left := of; left > 0; {
		for _, s := range sh {
			if s.done || every > 0 && r.Float64() > s.speed {
				continue
			}
			s.sh.Estimate(&s.own, &est)
			if met(&est) {
				s.done = true
				left--
				if every > 0 {
					tell(s)
				}
				continue
			}
			s.own.Counts[0].Add(seq(s.own.Frames*int64(of) + int64(s.sh.Index)))
			s.own.Frames++
			if every > 0 && s.own.Frames%every == 0 {
				tell(s)
			}
		}
	}
	reach := int64(-1)
	for i, s := range sh {
		computed += s.own.Frames
		if c := s.own.Frames*int64(of) + int64(i); reach < 0 || c < reach {
			reach = c
		}
	}
	return reach >= used, computed, used
}

// poolOf measures a link's per-frame errors over n frames through the engine.
func poolOf(t *testing.T, build func() (*link.Link, error), n int64) []int64 {
	t.Helper()
	var pool []int64
	obs := onCommit(func(_ int64, c []link.Tally) { pool = append(pool, c[0].Errors) })
	l, err := build()
	if err != nil {
		t.Fatal(err)
	}
	bits := int64(0)
	var f link.Frame
	c := make([]link.Tally, len(l.Taps()))
	if err := runFrame(l, &f, Spec{Seed: 5}, 0, c); err != nil {
		t.Fatal(err)
	}
	bits = c[0].Trials
	_, err = Run(context.Background(), Spec{Build: build, Seed: 5, Workers: 2, Observers: []Observer{obs},
		Rules: []stop.Rule{stop.Bits(float64(n * bits))}})
	if err != nil {
		t.Fatal(err)
	}
	return pool
}

// One round: merge covers at least 95 % of points in one round for 3, 8 and 16 shards, on
// independent errors, on a bursty synthetic source, on the fading demo's link (QPSK, Rayleigh
// with Doppler at walking pace) and on the coded demo's (K = 7 convolutional code, soft
// decisions), whether the shards run apart (the estimate widened by the dispersion each one
// observes) or tell each other their counts (Shard.Seen) every frame or every 8 frames; and the
// bits computed beyond what one machine needs stay below 1.5 times those it needs for 8 shards
// at 100 errors — for shards apart only with independent errors (bursty links apart pay for one
// round in overshoot: see frameSource.capped), for shards told every frame on every source. The
// frames of the demos are measured once and resampled (frames are independent: each draws from
// its own streams); the shard decision is the real Estimate and the real stop rules. The
// requirement (95 %, 1.5×) is the project's issue 21; the figures printed (go test -v) are the
// ones the README gives.
func TestShardsOneRound(t *testing.T) {
	e100 := func() []stop.Rule { return []stop.Rule{stop.Errors(100), stop.Bits(1e9)} }
	sources := []frameSource{
		{name: "independent (Poisson, 1 error a frame)", bits: 1024, rule: e100, capped: true, e100: true,
			draw: func(r *rand.Rand) int64 { return int64(distuv.Poisson{Lambda: 1, Src: r}.Rand()) }},
		{name: "bursty synthetic (1 frame in 20 in a fade, 20 errors)", bits: 1024, rule: e100, e100: true,
			draw: func(r *rand.Rand) int64 {
				if r.IntN(20) == 0 {
					return int64(distuv.Poisson{Lambda: 20, Src: r}.Rand())
				}
				return int64(distuv.Poisson{Lambda: 0.05, Src: r}.Rand())
			}},
		{name: "fading demo, 15 dB, walking, 100 errors", bits: 2048, rule: e100, e100: true, make: fadingPool},
		{name: "fading demo, 15 dB, walking, its rules (3000 errors or 3e6 bits)", bits: 2048,
			rule: func() []stop.Rule { return []stop.Rule{stop.Errors(3000), stop.Bits(3e6)} }, make: fadingPool},
		{name: "coded demo, conv_soft, 3 dB, its rules (100 errors or 1e7 bits)", bits: 4 * 188 * 8,
			rule: func() []stop.Rule { return []stop.Rule{stop.Errors(100), stop.Bits(1e7)} }, e100: true, make: codedPool},
	}
	const trials = 300
	pools := map[string][]int64{}
	for si, src := range sources {
		if src.make != nil {
			key := fmt.Sprintf("%p", src.make)
			if pools[key] == nil {
				p, what := src.make(t)
				pools[key] = p
				t.Logf("%s: %d frames measured, %s", src.name, len(p), what)
			}
			pool := pools[key]
			src.draw = func(r *rand.Rand) int64 { return pool[r.IntN(len(pool))] }
		}
		for _, every := range []int64{0, 1, 8} {
			mode := "apart"
			if every > 0 {
				mode = fmt.Sprintf("told every %d", every)
			}
			for _, of := range []int{3, 8, 16} {
				var o oneRound
				for k := 0; k < trials; k++ {
					r := rand.New(rand.NewPCG(uint64(si), uint64(of*trials+k)))
					speeds := rand.New(rand.NewPCG(uint64(si)+100, uint64(of*trials+k)))
					var frames []int64
					seq := func(f int64) link.Tally {
						for int64(len(frames)) <= f {
							frames = append(frames, src.draw(r))
						}
						return link.Tally{Trials: src.bits, Errors: frames[f]}
					}
					cov, comp, used := simulateShards(seq, src.rule(), of, every, speeds)
					o.points++
					if cov {
						o.covered++
					}
					o.computed += comp
					o.used += used
				}
				frac := float64(o.covered) / float64(o.points)
				over := float64(o.computed)/float64(o.used) - 1
				t.Logf("%-66s %-14s %2d shards: %5.1f %% covered in one round, overshoot %.2f×", src.name, mode, of, 100*frac, over)
				if frac < 0.95 {
					t.Errorf("%s, %s, %d shards: %.1f %% of points covered in one round, want at least 95 %%", src.name, mode, of, 100*frac)
				}
				if of == 8 && (every == 1 && src.e100 || every == 0 && src.capped) && over >= 1.5 {
					t.Errorf("%s, %s, 8 shards: overshoot %.2f× of the bits one machine needs, want below 1.5×", src.name, mode, over)
				}
			}
		}
	}
}

// fadingPool measures frames of experiments/fading.go's link at 15 dB, walking pace.
func fadingPool(t *testing.T) ([]int64, string) {
	const baud, carrier, light, v = 4800.0, 915e6, 3e8, 1.4
	build := func() (*link.Link, error) {
		m := modem.QPSK()
		rrc := pulse.RRC(0.35).Span(8).SPS(4)
		return link.Chain(source.Random(2048), m.Mod(), rrc.Shape(),
			channel.Rayleigh().Doppler(v*carrier/light/baud), channel.AWGN(15),
			rrc.Match(), pulse.Sample(), channel.KnownGain(), m.Demod()), nil
	}
	pool := poolOf(t, build, 600)
	return pool, describe(pool)
}

// codedPool measures frames of experiments/telemetry.go's conv_soft link at 3 dB.
func codedPool(t *testing.T) ([]int64, string) {
	build := func() (*link.Link, error) {
		m, c := modem.BPSK(), fec.Conv()
		return link.Chain(source.Random(4*188*8), c.Encoder(), m.Mod(), channel.AWGN(3),
			m.Demod().LogMAP(), c.Decoder()), nil
	}
	pool := poolOf(t, build, 600)
	return pool, describe(pool)
}

func describe(pool []int64) string {
	var s link.Tally
	for _, e := range pool {
		s.Add(link.Tally{Trials: 1, Errors: e})
	}
	zero := 0
	for _, e := range pool {
		if e == 0 {
			zero++
		}
	}
	return fmt.Sprintf("%.2f errors a frame, %d %% of frames without errors", float64(s.Errors)/float64(len(pool)), 100*zero/len(pool))
}
