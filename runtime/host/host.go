// Package host runs experiment scripts in the embedded Go interpreter (yaegi) against tally's
// compiled blocks: it checks imports against the sandbox, binds the script's sim.New to the
// run's options, and turns the interpreter's errors into file:line:col: message.
package host

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"go/parser"
	"go/scanner"
	"go/token"
	"io"
	"os"
	"path/filepath"
	"reflect"
	"regexp"
	"strconv"
	"strings"
	"testing/fstest"
	"time"

	"github.com/traefik/yaegi/interp"
	"github.com/traefik/yaegi/stdlib"
	ysyscall "github.com/traefik/yaegi/stdlib/syscall"
	yunsafe "github.com/traefik/yaegi/stdlib/unsafe"

	"tally/blocks/stop"
	"tally/runtime/host/symbols"
	"tally/runtime/internal/runner"
	"tally/runtime/internal/wire"
	"tally/runtime/longrun"
	"tally/runtime/progress"
	"tally/runtime/result"
	"tally/runtime/sim"
)

// ErrInterrupted is the error of a run ended by its context (Ctrl-C); its finished points are
// written.
var ErrInterrupted = runner.ErrInterrupted

// stuckGrace is how long an ended run may take to stop before the interpreter is stopped.
const stuckGrace = 3 * time.Second

// Config is what the command line tells a script run.
type Config struct {
	Workers int
	Seed    uint64
	SeedSet bool
	Quiet   bool
	Trust   bool      // lift the sandbox
	Log     io.Writer // progress and summaries (default stderr)
	Stdout  io.Writer // the script's own prints (default stdout)
	// Done receives each finished run before its files are written.
	Done func(r *result.Run) error
	// OnPoint and OnProgress, if set, follow the run as it goes (see runner.Options); under
	// isolate.Run the parent calls them from the child's point and progress messages.
	OnPoint    func(run *result.Run, total int)
	OnProgress func(p progress.Point, pr *stop.Progress)
	// Long are the checkpoint, resume, shard and merge settings (nil: no checkpoint).
	Long *longrun.Settings
	// Reuse lets points whose fingerprint is unchanged since the outputs beside the script
	// take their frames from them instead of computing them (tally watch; see runner.Options).
	Reuse bool
	// Point, if set, is given the run so far after each point ends (see sim.Options.Point).
	Point func(r *result.Run)
	// Output, if set, writes a finished run's files instead of output.Write.
	Output func(dir string, r *result.Run) error
	// Position, if set, is given before the script starts a function naming the statement the
	// script last reached ("file:line:col", "" before any), safe to call from any goroutine.
	Position func(where func() string)
	// HandAt and Handover, if both set: once point HandAt.Point has committed HandAt.Frame
	// frames the run calls Handover, which cancels ctx with runner.ErrHandover (a hand-over
	// placed by a test; see runtime/isolate).
	HandAt   *wire.Spot
	Handover func()
	// Reported is the number of points a run this one continues has reported (not printed
	// again).
	Reported int
}

// ScriptError is a mistake in a script, at a position in it.
type ScriptError struct {
	Pos string // file:line:col
	Msg string
}

func (e *ScriptError) Error() string {
	if e.Pos == "" {
		return e.Msg
	}
	return e.Pos + ": " + e.Msg
}

// Run evaluates the script at path, which runs its experiment(s) and writes their outputs.
// A mistake in the script comes back as a *ScriptError; an interrupted run as
// ErrInterrupted (its finished points written).
func Run(ctx context.Context, path string, cfg Config) error {
	src, err := os.ReadFile(path)
	if err != nil {
		return err
	}
	if err := checkImports(path, src, cfg.Trust); err != nil {
		return err
	}
	fset := token.NewFileSet()
	file, err := parser.ParseFile(fset, path, src, 0)
	if err != nil {
		return translate(path, err, nil)
	}
	prep, err := prepare(fset, file, path, src)
	if err != nil {
		return err
	}
	if err := checkLimits(fset, file, path); err != nil {
		return err
	}
	marked, mk := instrument(fset, file, prep.src, prep.fixes...)
	mk.prep = prep
	runner.Hosted()
	opts := &runner.Options{Context: ctx, Script: path, Source: src, Mode: "interpreted", Workers: cfg.Workers,
		Seed: cfg.Seed, SeedSet: cfg.SeedSet, Quiet: cfg.Quiet, Log: cfg.Log, Done: cfg.Done, Long: cfg.Long, Reuse: cfg.Reuse,
		Point: cfg.Point, Output: cfg.Output, OnPoint: cfg.OnPoint, OnProgress: cfg.OnProgress,
		HandAt: cfg.HandAt, Handover: cfg.Handover, Reported: cfg.Reported}
	var stderr bytes.Buffer
	stdout := cfg.Stdout
	if stdout == nil {
		stdout = os.Stdout
	}
	name := filepath.Base(path)
	i := interp.New(interp.Options{Stdout: stdout, Stderr: &stderr, Unrestricted: cfg.Trust, GoPath: os.DevNull,
		SourcecodeFilesystem: fstest.MapFS{name: &fstest.MapFile{Data: marked}}})
	if cfg.Trust {
		err = errors.Join(i.Use(stdlib.Symbols), i.Use(yunsafe.Symbols), i.Use(ysyscall.Symbols))
	} else {
		err = i.Use(safeSymbols())
	}
	if err == nil {
		err = errors.Join(i.Use(bound(opts)), i.Use(mk.exports()))
	}
	opts.Where = mk.where
	if cfg.Position != nil {
		cfg.Position(mk.where)
	}
	if err != nil {
		return fmt.Errorf("host: %w", err)
	}
	ran := false
	opts.Done = func(r *result.Run) error {
		ran = true
		if cfg.Done != nil {
			return cfg.Done(r)
		}
		return nil
	}
	// The engine stops at once when ctx ends and the run then writes its finished points; only a
	// script stuck in its own code needs the interpreter stopped, a grace period later.
	evalCtx, stopEval := context.WithCancel(context.Background())
	defer stopEval()
	go func() {
		select {
		case <-ctx.Done():
			select {
			case <-time.After(stuckGrace):
				stopEval()
			case <-evalCtx.Done():
			}
		case <-evalCtx.Done():
		}
	}()
	_, err = i.EvalPathWithContext(evalCtx, name)
	if err != nil && errors.Is(err, context.Canceled) && ctx.Err() != nil {
		return ErrInterrupted
	}
	if err != nil {
		return translate(path, err, mk)
	}
	if !ran {
		return &ScriptError{Pos: path, Msg: "the script ran no experiment (does main call Run?)"}
	}
	return nil
}

// bound are tally's symbols with sim.New bound to this run's options.
func bound(opts *runner.Options) interp.Exports {
	out := interp.Exports{}
	for k, v := range symbols.Symbols {
		out[k] = v
	}
	key := "tally/runtime/sim/sim"
	simSyms := map[string]reflect.Value{}
	for k, v := range symbols.Symbols[key] {
		simSyms[k] = v
	}
	simSyms["New"] = reflect.ValueOf(func(name string) *sim.Experiment { return runner.NewExperiment(name, opts).(*sim.Experiment) })
	out[key] = simSyms
	return out
}

// Version is tally's version, as run.json records it (tool_version).
const Version = runner.Version

var posRE = regexp.MustCompile(`^(?:(.*?):)?(\d+):(\d+): (.*)$`)

// translate turns an interpreter error into a ScriptError at the script's position: a compile
// error where the interpreter found it, a panic (from script code, sim or a block) at the last
// statement the script reached.
func translate(path string, err error, mk *marks) error {
	var pn interp.Panic
	if errors.As(err, &pn) {
		if e, ok := pn.Value.(error); ok && errors.Is(e, ErrInterrupted) {
			return ErrInterrupted
		}
		var f *runner.Failure
		if e, ok := pn.Value.(error); ok && errors.As(e, &f) && f.Pos != "" {
			msg, line, col := inGoWords(f.Err)
			if mk != nil && line > 0 {
				col = mk.column(line, col) // the interpreter's column counts the inserted markers
			}
			return &ScriptError{Pos: scriptPosAt(f.Pos, line, col), Msg: msg}
		}
		pos := path
		if mk != nil && mk.where() != "" {
			pos = mk.where()
		}
		msg, line, col := goMessage(pn.Value)
		if mk != nil && line > 0 {
			col = mk.column(line, col)
		}
		return &ScriptError{Pos: scriptPosAt(pos, line, col), Msg: msg}
	}
	var list scanner.ErrorList
	if errors.As(err, &list) && len(list) > 0 {
		p := list[0].Pos
		return &ScriptError{Pos: fmt.Sprintf("%s:%d:%d", path, p.Line, p.Column), Msg: syntaxMessage(path, list[0])}
	}
	s := err.Error()
	if m := posRE.FindStringSubmatch(firstLine(s)); m != nil {
		line, _ := strconv.Atoi(m[2])
		col, _ := strconv.Atoi(m[3])
		msg := strings.TrimSpace(m[4])
		if mk != nil {
			col = mk.column(line, col)
			if mk.prep != nil {
				msg = mk.prep.unsupported(line, col)
			}
		}
		return &ScriptError{Pos: fmt.Sprintf("%s:%d:%d", path, line, col), Msg: msg}
	}
	return &ScriptError{Pos: path, Msg: s}
}

func firstLine(s string) string {
	if i := strings.IndexByte(s, '\n'); i >= 0 {
		return s[:i]
	}
	return s
}

// BuildIdentity is this tally build's identity in point fingerprints; the parent hands it to a
// compiled script continuing a run, which is built from the same sources.
func BuildIdentity() string { return runner.BuildIdentity() }
