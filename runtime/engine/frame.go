package engine

import (
	"fmt"

	"tally/blocks/link"
)

// runFrame runs one frame, turning a panic in a block (a script's own, say) into an error that
// names where it happened when Spec.Where can tell.
func runFrame(l *link.Link, f *link.Frame, s Spec, idx int, c []link.Tally) (err error) {
	defer func() {
		if v := recover(); v != nil {
			err = &PanicError{Value: v}
			if s.Where != nil {
				err.(*PanicError).Where = s.Where()
			}
		}
	}()
	return l.Run(f, s.Seed, s.Point, idx, c)
}

// PanicError is a panic inside a block while it processed a frame.
type PanicError struct {
	Value any
	Where string // the script position, when known
}

func (e *PanicError) Error() string { return fmt.Sprintf("panic: %v", e.Value) }
