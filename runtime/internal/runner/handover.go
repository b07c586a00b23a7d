package runner

import (
	"context"
	"errors"
	"fmt"
	"sync"

	"tally/blocks/link"
	"tally/runtime/engine"
)

// ErrHandover is the cause with which a run's context is cancelled to hand it over (see
// runtime/isolate): the engine stops at a commit boundary as for an interrupt, the checkpoint
// keeps the committed prefix, and the run writes no outputs, reports no interrupted point and
// ends with ErrInterrupted; the program it is handed to continues from the checkpoint.
var ErrHandover = errors.New("run handed over")

var handover struct {
	sync.Mutex
	begun   bool   // the script's run has begun (Run was called)
	ended   bool   // its points are done: nothing left to hand over
	pending func() // a hand-over asked for before
}

// RequestHandover asks the run of this process to stop for a hand-over by calling stop (which
// cancels the run's context with ErrHandover): at once when the script's run has begun, else
// when it begins, so a script still in its own code before Run gets there first and the
// checkpoint continued from is this run's.
func RequestHandover(stop func()) {
	handover.Lock()
	defer handover.Unlock()
	if handover.ended {
		return
	}
	if handover.begun {
		stop()
		return
	}
	handover.pending = stop
}

// begin notes that the script's run has begun, and hands it over if that was asked.
func begin() {
	handover.Lock()
	defer handover.Unlock()
	handover.begun = true
	if handover.pending != nil {
		handover.pending()
	}
}

// ended notes that the run's points are done.
func ended() {
	handover.Lock()
	handover.ended = true
	handover.Unlock()
}

// handingOver says whether the run is stopping for a hand-over.
func (o *Options) handingOver() bool {
	return o.Context != nil && errors.Is(context.Cause(o.Context), ErrHandover)
}

// handAt is the observer that hands the run over after its point's Frame-th commit
// (Options.HandAt).
type handAt struct {
	engine.Ignore
	frame int64
	fire  func()
	done  bool
}

func (h *handAt) Committed(f int64, _ []link.Tally) {
	if !h.done && f+1 >= h.frame {
		h.done = true
		h.fire()
	}
}

// handAtPoint is the observer for point index, or nil; a hand-over between points (Frame 0)
// happens before the point's first frame.
func (o *Options) handAtPoint(index int) engine.Observer {
	if o.HandAt == nil || o.Handover == nil || o.HandAt.Point != index {
		return nil
	}
	if o.HandAt.Frame <= 0 {
		o.Handover()
		return nil
	}
	return &handAt{frame: o.HandAt.Frame, fire: o.Handover}
}

// shownPos is a position in the script as tally named it: a compiled run's process was built
// from a copy of the script.
func shownPos(file string, line int) string {
	if child != nil && child.shown != "" {
		return fmt.Sprintf("%s:%d", child.shown, line)
	}
	return fmt.Sprintf("%s:%d", displayPath(file), line)
}
