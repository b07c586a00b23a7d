package runner

import (
	"context"
	"errors"
	"fmt"

	"tally/blocks/link"
	"tally/runtime/engine"
)

// ErrHandover is the cause with which a run's context is cancelled to hand it over (see
// runtime/isolate): the engine stops at a commit boundary as for an interrupt, the checkpoint
// keeps the committed prefix, and the run writes no outputs, reports no interrupted point and
// ends with ErrInterrupted; the program it is handed to continues from the checkpoint.
var ErrHandover = errors.New("run handed over")

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
