package runner

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"runtime"
	"strings"
)

// Failure is a mistake in a script, or a run that could not complete.
type Failure struct {
	Pos string // "file:line" in the script, when known
	Err error
}

func (f *Failure) Error() string {
	if f.Pos == "" {
		return f.Err.Error()
	}
	return f.Pos + ": " + f.Err.Error()
}

func (f *Failure) Unwrap() error { return f.Err }

// scriptFile is the compiled script's file (from the caller of New) when run by `go run`.
var scriptFile string

// hosted is true while the interpreter host runs scripts: mistakes then panic, and the
// interpreter reports the script position of the call that failed.
var hosted bool

// Hosted tells the package that scripts run in the interpreter host: from then on mistakes
// panic, so the interpreter reports the script line, instead of exiting the process.
func Hosted() { hosted = true }

// Fail stops the script at a mistake. Hosted, it panics so the interpreter names the line;
// compiled, it prints "file:line: message" for the script line that led here and exits 1.
func Fail(err error) {
	if hosted {
		panic(err)
	}
	var f *Failure
	if !errors.As(err, &f) || f.Pos == "" {
		f = &Failure{Pos: scriptPos(callers(3)), Err: err}
	}
	if child != nil {
		child.end(f)
		os.Exit(0)
	}
	fmt.Fprintln(os.Stderr, f.Error())
	os.Exit(1)
}

// where names the script statement being run: from the host's markers, or, compiled, from the
// stack.
func (o *Options) where(skip int) string {
	if o.Where != nil {
		return o.Where()
	}
	return scriptPos(callers(skip))
}

func callers(skip int) []uintptr {
	pc := make([]uintptr, 64)
	return pc[:runtime.Callers(skip, pc)]
}

// scriptPos finds the innermost frame of the script file in a stack.
func scriptPos(pcs []uintptr) string {
	if scriptFile == "" {
		return ""
	}
	frames := runtime.CallersFrames(pcs)
	for {
		fr, more := frames.Next()
		if fr.File == scriptFile {
			return shownPos(fr.File, fr.Line)
		}
		if !more {
			return ""
		}
	}
}

// displayPath shows a path relative to the working directory when it lies below it.
func displayPath(p string) string {
	if wd, err := os.Getwd(); err == nil {
		if r, err := filepath.Rel(wd, p); err == nil && !strings.HasPrefix(r, "..") {
			return r
		}
	}
	return p
}

// recovered turns a panic in script code called by the engine into a Failure that points at
// the script line (compiled runs; hosted runs let the interpreter report it).
func recovered(v any) error {
	err, ok := v.(error)
	if !ok {
		err = fmt.Errorf("%v", v)
	}
	var f *Failure
	if errors.As(err, &f) {
		return f
	}
	return &Failure{Pos: scriptPos(callers(4)), Err: err}
}
