package engine

import (
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"

	"tally/blocks/link"
	"tally/blocks/stop"
)

// sums is the running sums of frames: sums[k] the counts of the first k.
func sums(frames []link.Tally) []link.Tally {
	s := make([]link.Tally, len(frames)+1)
	for k, f := range frames {
		s[k+1] = s[k]
		s[k+1].Add(f)
	}
	return s
}

// told is shard j's Seen with a step after each of the given numbers of its frames.
func told(j int, run []link.Tally, at ...int64) Seen {
	s := Seen{Index: j}
	for _, n := range at {
		s.Record(n, []link.Tally{run[n]})
	}
	return s
}

// When every other shard has told its counts exactly as far as the prefix up to this shard's
// next frame reaches, nothing is left to estimate: the estimate is that prefix's count, frames,
// trials and errors (the merge's prefix; a fact of the frame layout, no source).
func TestEstimateSeenEverything(t *testing.T) {
	const of, index, k = 4, 2, 30
	r := rand.New(rand.NewPCG(3, 4))
	frame := func(f int64) link.Tally {
		return link.Tally{Trials: 100, Errors: int64(distuv.Poisson{Lambda: 2, Src: r}.Rand())}
	}
	var all []link.Tally
	for f := int64(0); f < (k+2)*of; f++ {
		all = append(all, frame(f))
	}
	runs := make([][]link.Tally, of) // each shard's running sums
	for j := range runs {
		var mine []link.Tally
		for f := j; f < len(all); f += of {
			mine = append(mine, all[f])
		}
		runs[j] = sums(mine)
	}
	reach := int64(k*of + index)
	prefix := sums(all[:reach])[reach]
	sh := Shard{Index: index, Of: of, Z: 3}
	for j := 0; j < of; j++ {
		if j == index {
			continue
		}
		m := int64(k)
		if j < index {
			m = k + 1
		}
		// Steps before, at and after the prefix's share: the one at m is used.
		sh.Seen = append(sh.Seen, told(j, runs[j], m-5, m, m+1))
	}
	var est stop.Progress
	sh.Estimate(&stop.Progress{Frames: k, Counts: []link.Tally{runs[index][k]}}, &est)
	if est.Frames != reach || est.Counts[0].Trials != prefix.Trials || est.Counts[0].Errors != prefix.Errors {
		t.Errorf("estimate %d frames, %d trials, %d errors; the prefix is %d, %d, %d",
			est.Frames, est.Counts[0].Trials, est.Counts[0].Errors, reach, prefix.Trials, prefix.Errors)
	}
}

// A shard that sees others which have told nothing yet estimates as a shard apart does (the
// formula of Estimate's doc: the pooled rate is its own, the unknown frames the others').
func TestEstimateSeenNothing(t *testing.T) {
	own := &stop.Progress{Frames: 100, Counts: []link.Tally{{Trials: 100 * 1000, Errors: 200, Frames: 100, Squares: 20 * 10 * 10}}}
	apart := Shard{Index: 0, Of: 8}
	seeing := Shard{Index: 0, Of: 8, Seen: []Seen{{Index: 3}, {Index: 5}}}
	var a, b stop.Progress
	apart.Estimate(own, &a)
	seeing.Estimate(own, &b)
	if a.Counts[0] != b.Counts[0] || a.Frames != b.Frames {
		t.Errorf("seeing empty steps: %+v, %d frames; apart: %+v, %d frames", b.Counts[0], b.Frames, a.Counts[0], a.Frames)
	}
}

// Seeing others, the estimate still errs low about as rarely as Margin promises: with Poisson
// error counts per frame (the rare-error limit of the binomial), four shards, and the others
// having told their counts part of the way, the estimate of shard 1 exceeds the prefix's true
// errors in well under 1 % of trials (the margin for 4 shards is the normal quantile at
// 1 − 0.01/4, 2.81σ; Abramowitz & Stegun, Handbook of Mathematical Functions, 1964, table
// 26.1). And it is tighter than apart: on average it lies closer to the truth.
func TestEstimateSeenErrsLow(t *testing.T) {
	const of, index, k, trials = 4, 1, 40, 4000
	r := rand.New(rand.NewPCG(7, 8))
	over := 0
	var gapSeen, gapApart float64
	for n := 0; n < trials; n++ {
		lambda := []float64{0.5, 2, 5}[n%3]
		runs := make([][]link.Tally, of)
		for j := range runs {
			mine := make([]link.Tally, k+1)
			for f := range mine {
				mine[f] = link.Tally{Trials: 64, Errors: int64(distuv.Poisson{Lambda: lambda, Src: r}.Rand())}
			}
			runs[j] = sums(mine)
		}
		var truth int64
		sh := Shard{Index: index, Of: of}
		for j := 0; j < of; j++ {
			m := int64(k)
			if j < index {
				m = k + 1
			}
			truth += runs[j][m].Errors
			if j != index {
				// Told at a quarter, at half, and (shard 3) beyond the prefix.
				at := []int64{k / 4, k / 2}
				if j == 3 {
					at = append(at, k+1)
				}
				sh.Seen = append(sh.Seen, told(j, runs[j], at...))
			}
		}
		own := &stop.Progress{Frames: k, Counts: []link.Tally{runs[index][k]}}
		var est, alone stop.Progress
		sh.Estimate(own, &est)
		Shard{Index: index, Of: of}.Estimate(own, &alone)
		if est.Counts[0].Errors > truth {
			over++
		}
		gapSeen += float64(truth - est.Counts[0].Errors)
		gapApart += float64(truth - alone.Counts[0].Errors)
	}
	if frac := float64(over) / trials; frac > 0.01 {
		t.Errorf("the estimate seeing others exceeds the prefix's errors in %.2f %% of trials, want under 1 %%", 100*frac)
	}
	if gapSeen >= gapApart {
		t.Errorf("seeing others the estimate lies %.1f errors below the truth on average, apart %.1f: it must be closer", gapSeen/trials, gapApart/trials)
	}
}

// Record keeps at most MaxSteps steps, in order, the first and the latest among them, and
// denser towards the latest; a step of no more frames than the last is ignored; at finds the
// last step of at most the frames asked.
func TestSeenRecord(t *testing.T) {
	var s Seen
	for n := int64(1); n <= 1000; n++ {
		s.Record(n, []link.Tally{{Trials: n, Errors: n / 3}})
		s.Record(n-1, []link.Tally{{}}) // no further than the last: ignored
	}
	if len(s.Steps) > MaxSteps || s.Steps[0].Frames != 1 || s.Steps[len(s.Steps)-1].Frames != 1000 {
		t.Fatalf("%d steps from %d to %d frames; want at most %d, from 1 to 1000", len(s.Steps), s.Steps[0].Frames, s.Steps[len(s.Steps)-1].Frames, MaxSteps)
	}
	for k := 1; k < len(s.Steps); k++ {
		if s.Steps[k].Frames <= s.Steps[k-1].Frames || s.Steps[k].Counts[0].Trials != s.Steps[k].Frames {
			t.Fatalf("step %d: %+v after %+v", k, s.Steps[k], s.Steps[k-1])
		}
	}
	if n := len(s.Steps); s.Steps[n-1].Frames-s.Steps[n-2].Frames >= s.Steps[2].Frames-s.Steps[1].Frames {
		t.Errorf("steps not denser towards the latest: %v … %v", s.Steps[:3], s.Steps[n-2:])
	}
	for _, m := range []int64{500, 990, 1000, 5000} {
		f, c := s.at(m)
		k := 0
		for k < len(s.Steps) && s.Steps[k].Frames <= m {
			k++
		}
		if want := s.Steps[k-1].Frames; f != want || c[0].Trials != f {
			t.Errorf("the step at %d frames is at %d (%v), want the last of at most %d frames, %d", m, f, c, m, want)
		}
	}
	if f, c := s.at(0); f != 0 || c != nil {
		t.Errorf("the step at 0 frames is at %d (%v), want none", f, c)
	}
}
