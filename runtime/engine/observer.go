package engine

import (
	"tally/blocks/link"
	"tally/blocks/stop"
)

// Observer is told how a point goes, by the goroutine that commits its frames, in this order:
// Started once, Committed after each frame commit in frame order (with Progress between
// commits, at most every Spec.ProgressEvery), and Finished when the point ends without error
// (met a rule, was interrupted, or a replay ran short). Its methods must be quick: the commit
// loop waits for them. Checkpoints, shard files, the live progress line and future views of a
// run plug in here without touching the commit loop.
type Observer interface {
	// Started gives the link's tap names, before any commit.
	Started(taps []string)
	// Committed gives frame's own counts (not the running sum), one Tally per tap.
	Committed(frame int64, counts []link.Tally)
	// Progress gives the committed prefix (a shard: its own frames); it is the engine's and
	// must not be kept.
	Progress(prefix *stop.Progress)
	// Finished gives the point's outcome.
	Finished(out Outcome)
}

// Ignore is an Observer that does nothing: embed it and override what is needed.
type Ignore struct{}

func (Ignore) Started([]string)              {}
func (Ignore) Committed(int64, []link.Tally) {}
func (Ignore) Progress(*stop.Progress)       {}
func (Ignore) Finished(Outcome)              {}

// Observers tells each of its observers in turn.
type Observers []Observer

func (o Observers) Started(taps []string) {
	for _, x := range o {
		x.Started(taps)
	}
}

func (o Observers) Committed(frame int64, counts []link.Tally) {
	for _, x := range o {
		x.Committed(frame, counts)
	}
}

func (o Observers) Progress(p *stop.Progress) {
	for _, x := range o {
		x.Progress(p)
	}
}

func (o Observers) Finished(out Outcome) {
	for _, x := range o {
		x.Finished(out)
	}
}
