package runner

import (
	"fmt"
	"slices"
	"strings"
	"sync"

	"tally/blocks/link"
	"tally/runtime/result"
)

// frameFit rounds each built link's frame length up to what its blocks take in whole units
// (link.Link.Fit) and remembers, once per change, a plain sentence saying so: printed when it
// first happens and kept for the run's notes (README.md, run.json). Workers build links at the
// same time, so it locks.
type frameFit struct {
	mu    sync.Mutex
	seen  map[string]bool
	notes []string
}

// fit rounds the frame length of l (of the links of a paired group together, which must send
// the same bits) and tells the user the first time a change is made.
func (x *experiment) fit(pt Point, ls ...*link.Link) {
	if len(ls) == 0 || slices.Contains(ls, nil) {
		return
	}
	from, to, why := link.FitTogether(ls...)
	if from == to {
		return
	}
	msg := fmt.Sprintf("Frames rounded up from %d to %d source bits so that every block takes whole units (%s); "+
		"source.Random(%d).Exact() keeps the length as typed.", from, to, why, from)
	if len(pt.Names) > 1 { // the curve it happened on
		var on []string
		for _, n := range pt.Names[1:] {
			on = append(on, n+"="+pt.Label(n))
		}
		msg = strings.Join(on, " ") + ": f" + msg[1:]
	}
	f := &x.frames
	f.mu.Lock()
	defer f.mu.Unlock()
	if f.seen[msg] {
		return
	}
	if f.seen == nil {
		f.seen = map[string]bool{}
	}
	f.seen[msg] = true
	f.notes = append(f.notes, msg)
	x.opts.logf("%s\n", msg)
}

// frameNotes adds the rounding sentences to the run's notes.
func (x *experiment) frameNotes(run *result.Run) {
	x.frames.mu.Lock()
	defer x.frames.mu.Unlock()
	run.Notes = append(run.Notes, x.frames.notes...)
}
