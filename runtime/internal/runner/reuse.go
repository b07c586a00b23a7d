package runner

import (
	"context"
	"time"

	"tally/blocks/stop"
	"tally/runtime/engine"
	"tally/runtime/output"
	"tally/runtime/result"
)

// Under tally watch a save reruns the script, but a point whose link fingerprint is the same
// as a point of the last good run computes, by construction, the same counts for every frame
// (same program, seed, point and link; see fingerprint.go). Such a point replays the last
// run's per-frame counts (frames.gz) through the engine instead of computing them: the rules
// are judged on the replayed prefix frame by frame exactly as on computed frames, so the point
// ends where a fresh run would — for the same rules at the same frame, for changed rules
// within the replayed frames or, when they ask for more, computing on from where the
// replayed frames end. The table is the one a fresh run gives.

// previous are the points of the last good run in dir that can be replayed, by link
// fingerprint: those with a fingerprint and their per-frame counts.
func previous(dir string) map[string]*result.Point {
	r := output.ReadRecord(dir)
	if r == nil {
		return nil
	}
	if n, err := output.ReadFrames(dir, r); err != nil || n == 0 {
		return nil
	}
	m := map[string]*result.Point{}
	for i := range r.Points {
		p := &r.Points[i]
		if p.LinkFingerprint != "" && p.Log.Usable() && p.Log.Frames == p.Frames && p.Frames > 0 {
			m[p.LinkFingerprint] = p
		}
	}
	return m
}

// reuseOrRun runs the point's engine spec s, replaying prev's frames first when prev (a point
// of the last run with this link fingerprint) is given and the point starts afresh. It returns
// how many frames were replayed.
func (x *experiment) reuseOrRun(ctx context.Context, pt Point, rules []stop.Rule, s engine.Spec, prev *result.Point) (engine.Outcome, int64, error) {
	if prev == nil || s.Start != nil || s.Shard != nil || s.Replay != nil {
		out, err := x.runEngine(ctx, pt, rules, s)
		return out, 0, err
	}
	log := prev.Log
	r := s
	r.Replay = log.Frame
	r.Workers = 1
	out, err := x.runEngine(ctx, pt, rules, r)
	if err != nil {
		return out, 0, err
	}
	// The replayed frames cost the time they took to compute in the last run.
	spent := time.Duration(prev.Seconds * float64(out.Frames) / float64(prev.Frames) * float64(time.Second))
	replayed := out.Frames
	if out.Stop != engine.Short {
		out.Elapsed = spent
		return out, replayed, nil
	}
	// The rules ask for more frames than the last run kept: compute on from there.
	s.Start = &engine.State{Frames: out.Frames, Counts: out.Counts, Elapsed: spent, Log: out.Log}
	out, err = x.runEngine(ctx, pt, rules, s)
	return out, replayed, err
}
