// Package wire holds the messages a run's process and tally exchange (see runtime/isolate's
// protocol.go for the conversation): defined once, for the interpreter's process (runtime/isolate)
// and for a compiled script's (runtime/internal/runner), which is handed a run over.
//
// It is internal: no script can name it.
package wire

import (
	"time"

	"tally/blocks/stop"
	"tally/runtime/longrun"
	"tally/runtime/progress"
	"tally/runtime/result"
)

// EnvChild marks a process started as a run's process: its value is the protocol version.
const EnvChild = "TALLY_ISOLATED_CHILD"

// Protocol is the version of the conversation.
const Protocol = "3"

// Report kinds, child to parent.
const (
	KindPos    = "pos"
	KindPoint  = "point"
	KindLive   = "progress"
	KindDone   = "done"
	KindWrite  = "write"
	KindEnd    = "end"
	KindMemory = "memory"
)

// Report is one message from the child.
type Report struct {
	Kind        string
	Pos         string      // pos, end: file:line:col
	Err         string      // end: the mistake, "" when the script ended well
	Script      bool        // end: Err is a mistake in the script (at Pos)
	Interrupted bool        // end: the run was stopped by the parent
	Handover    bool        // end (with Interrupted): stopped at a commit boundary for a hand-over, its checkpoint saved
	Run         *result.Run // point, done
	Total       int         // point: points in the sweep
	Live        *Live       // progress
	Dir         string      // write
	Bytes       int64       // memory: what the child held
}

// Job is what the child is to run: the command line's settings, no writer and no callback.
type Job struct {
	Path    string
	Workers int
	Seed    uint64
	SeedSet bool
	Quiet   bool
	Trust   bool
	Memory  int64  // bytes
	Follow  bool   // send progress messages (the parent has an OnProgress)
	Reuse   bool   // host.Config.Reuse: replay the last good run's unchanged points
	Build   string // the parent tally's build identity, kept by a compiled child (fingerprints)
	// long-run settings (longrun.Settings without a merge's replay)
	Long    bool
	Resume  bool
	Restart bool
	Every   time.Duration
	Shard   *longrun.Part
	Extend  bool
	// HandAt, if set, makes an interpreted child hand over by itself at that point and frame
	// (tests place the hand-over so).
	HandAt *Spot
	// Continued: a compiled child continuing a run handed over to it. Source is the script's
	// bytes it was built from; Reported the points the run before it already reported.
	Continued bool
	Source    []byte
	Reported  int
}

// Spot is a place in a run: point Point (from 0) after Frame committed frames.
type Spot struct {
	Point int
	Frame int64
}

// Reply is a message from the parent: an answer to done or write, or a stop.
type Reply struct {
	Stop     bool
	Handover bool   // with Stop: stop at the next commit boundary and save the checkpoint, to be continued
	Err      string // the answer: "" accepted, else why not
}

// Live is a progress message: progress.Point without its rules, which are script values the
// pipe cannot carry, but with the rules a goal and the time left are read from
// (progress.Goals, progress.Left); and the engine's prefix.
type Live struct {
	Label        string
	Index, Total int
	Confidence   float64
	Method       string
	Tap          string // the governing tap the line counts
	Custom       bool   // the link has a block of the script's own (progress.Point.Custom)
	Errors       []stop.ErrorTarget
	Bits         []stop.BitCap
	Time         []stop.TimeLimit
	Prefix       stop.Progress
}

// LiveOf is the progress message of a point's prefix.
func LiveOf(p progress.Point, pr *stop.Progress) *Live {
	l := &Live{Label: p.Label, Index: p.Index, Total: p.Total, Confidence: p.Confidence, Method: p.Method, Tap: p.Tap, Custom: p.Custom, Prefix: *pr}
	for _, r := range p.Rules {
		switch r := r.(type) {
		case *stop.ErrorTarget:
			l.Errors = append(l.Errors, *r)
		case *stop.BitCap:
			l.Bits = append(l.Bits, *r)
		case *stop.TimeLimit:
			l.Time = append(l.Time, *r)
		}
	}
	return l
}

// Point is the progress.Point the parent hands its OnProgress.
func (l *Live) Point() progress.Point {
	p := progress.Point{Label: l.Label, Index: l.Index, Total: l.Total, Confidence: l.Confidence, Method: l.Method, Tap: l.Tap, Custom: l.Custom}
	for i := range l.Errors {
		p.Rules = append(p.Rules, &l.Errors[i])
	}
	for i := range l.Bits {
		p.Rules = append(p.Rules, &l.Bits[i])
	}
	for i := range l.Time {
		p.Rules = append(p.Rules, &l.Time[i])
	}
	return p
}

// Settings are the job's long-run settings (nil: none).
func (j Job) Settings() *longrun.Settings {
	if !j.Long {
		return nil
	}
	return &longrun.Settings{Resume: j.Resume, Restart: j.Restart, Every: j.Every, Shard: j.Shard, Extend: j.Extend, HandedOver: j.Continued}
}

// WithoutLogs is the run so far without its points' per-frame counts: the parent follows a run
// point by point for its figures, and gets the frames with the finished run (done), once.
func WithoutLogs(r *result.Run) *result.Run {
	c := *r
	c.Points = append([]result.Point(nil), r.Points...)
	for i := range c.Points {
		c.Points[i].Log = nil
	}
	return &c
}
