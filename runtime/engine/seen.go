package engine

import (
	"math"

	"tally/blocks/link"
	"tally/blocks/stats"
	"tally/blocks/stop"
)

// Seen is what a shard knows of another shard's share of a point: that shard's counts after
// some of its own frames, as it last told them (Steps, by Frames ascending). Frame f's counts
// depend only on the seed, the point and f, so a step is a fact about the point whatever the
// time it was told: a stale Seen holds fewer facts, never a false one.
type Seen struct {
	Index int // the shard that told them
	Steps []Step
}

// Step is a shard's counts (per tap, summed over its frames) after its first Frames frames.
type Step struct {
	Frames int64
	Counts []link.Tally
}

// MaxSteps is how many steps a Seen keeps: Record thins the older ones, so the recent steps,
// where a lagging shard looks, stay dense (their spacing grows with the distance from the
// latest) and a long point's Seen stays small.
const MaxSteps = 32

// Record adds the step of the shard's first frames frames, with counts (copied). A step of
// no more frames than the last is ignored.
func (s *Seen) Record(frames int64, counts []link.Tally) {
	if n := len(s.Steps); frames <= 0 || n > 0 && frames <= s.Steps[n-1].Frames {
		return
	}
	s.Steps = append(s.Steps, Step{Frames: frames, Counts: append([]link.Tally(nil), counts...)})
	if len(s.Steps) <= MaxSteps {
		return
	}
	// Drop the step whose neighbours are closest, measured against their distance from the
	// latest: the steps thin out geometrically backwards from it.
	n := len(s.Steps)
	last := float64(s.Steps[n-1].Frames)
	drop, best := 1, math.Inf(1)
	for k := 1; k < n-1; k++ {
		gap := float64(s.Steps[k+1].Frames - s.Steps[k-1].Frames)
		if v := gap / (last - float64(s.Steps[k-1].Frames)); v < best {
			drop, best = k, v
		}
	}
	s.Steps = append(s.Steps[:drop], s.Steps[drop+1:]...)
}

// at is the last step of at most frames frames (the zero step when there is none).
func (s *Seen) at(frames int64) (int64, []link.Tally) {
	var best *Step
	for k := range s.Steps {
		if s.Steps[k].Frames > frames {
			break
		}
		best = &s.Steps[k]
	}
	if best == nil {
		return 0, nil
	}
	return best.Frames, best.Counts
}

// last is the shard's latest step (the zero step when there is none).
func (s *Seen) last() (int64, []link.Tally) {
	if len(s.Steps) == 0 {
		return 0, nil
	}
	l := s.Steps[len(s.Steps)-1]
	return l.Frames, l.Counts
}

// estimateSeen is Estimate when the shard sees what other shards have told (Shard.Seen).
//
// When this shard has counted own, k frames, the prefix up to its next frame, k·Of+Index
// frames, holds k+1 frames of every shard j < Index and k of every other: m_j of shard j. What
// this shard knows of that prefix is its own frames and, of every shard j it sees, the last
// step of at most m_j frames; these known counts are exact, and the prefix holds at least
// their errors. The frames it does not know, U in all, are estimated from the rate and the
// index of dispersion D of every frame it knows (n frames, λ errors a frame, all shards' last
// steps pooled): U·λ errors, with variance U·λ·D·(1 + U/n) — the unknown frames' own spread
// plus the error of λ — less Z standard deviations, and never below the known errors. With
// nothing seen this is the estimate of Estimate's doc; as the shards tell more, U shrinks and
// the estimate tends to the prefix itself, so the shards stop close to where one machine does.
func (s Shard) estimateSeen(own, into *stop.Progress, z float64) {
	k := own.Frames
	into.Taps = own.Taps
	into.Elapsed = own.Elapsed
	if len(into.Counts) != len(own.Counts) {
		into.Counts = make([]link.Tally, len(own.Counts))
	}
	// The other shards' frames in the prefix: k+1 of each shard before this one, k of each after.
	others := int64(s.Of-1)*k + int64(s.Index)
	for t, c := range own.Counts {
		known, pool := c, c
		unknown := others
		for q := range s.Seen {
			sn := &s.Seen[q]
			j := sn.Index
			if j < 0 || j >= s.Of || j == s.Index {
				continue
			}
			m := k
			if j < s.Index {
				m = k + 1
			}
			a, counts := sn.at(m)
			unknown -= a
			if t < len(counts) {
				addSum(&known, counts[t])
			}
			if _, counts := sn.last(); t < len(counts) {
				addSum(&pool, counts[t])
			}
		}
		low, trials := float64(known.Errors), known.Trials
		if unknown > 0 && pool.Frames > 0 {
			u, n := float64(unknown), float64(pool.Frames)
			trials += int64(math.Round(u * float64(pool.Trials) / n))
			d := stats.Dispersion(pool)
			lambda := float64(pool.Errors) / n
			switch {
			case math.IsNaN(d) && pool.Errors > 0 && pool.Errors < pool.Trials:
				lambda, d = 0, 1 // errors in a single frame: their spread cannot be judged yet
			case !(d > 1):
				d = 1
			}
			mean := u * lambda
			low = math.Max(low, math.Floor(low+mean-z*math.Sqrt(mean*d*(1+u/n))))
		}
		into.Counts[t] = link.Tally{Trials: trials, Errors: int64(low)}
	}
	into.Frames = k*int64(s.Of) + int64(s.Index)
}

// addSum adds a sum of frames' counts b to a (link.Tally.Add adds one frame).
func addSum(a *link.Tally, b link.Tally) {
	a.Trials += b.Trials
	a.Errors += b.Errors
	a.Frames += b.Frames
	a.Squares += b.Squares
}
