// Package host runs experiment scripts in the embedded Go interpreter (yaegi) against tally's
// compiled blocks: it checks imports against the sandbox, binds the script's sim.New to the
// run's options, and turns the interpreter's errors into file:line:col: message.
package host

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"reflect"
	"regexp"
	"strings"

	"github.com/traefik/yaegi/interp"
	"github.com/traefik/yaegi/stdlib"
	ysyscall "github.com/traefik/yaegi/stdlib/syscall"
	yunsafe "github.com/traefik/yaegi/stdlib/unsafe"

	"tally/runtime/host/symbols"
	"tally/runtime/result"
	"tally/runtime/sim"
)

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
	Done  func(r *result.Run) error
	Extra map[string]string
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
// sim.ErrInterrupted (its finished points written).
func Run(ctx context.Context, path string, cfg Config) error {
	src, err := os.ReadFile(path)
	if err != nil {
		return err
	}
	if err := checkImports(path, src, cfg.Trust); err != nil {
		return err
	}
	sim.Hosted()
	opts := &sim.Options{Context: ctx, Script: path, Source: src, Mode: "interpreted", Workers: cfg.Workers,
		Seed: cfg.Seed, SeedSet: cfg.Seed != 0 || cfg.SeedSet, Quiet: cfg.Quiet, Log: cfg.Log, Done: cfg.Done, Extra: cfg.Extra}
	opts.SeedSet = cfg.SeedSet
	var stderr bytes.Buffer
	stdout := cfg.Stdout
	if stdout == nil {
		stdout = os.Stdout
	}
	i := interp.New(interp.Options{Stdout: stdout, Stderr: &stderr, Unrestricted: cfg.Trust, GoPath: os.DevNull})
	if cfg.Trust {
		err = errors.Join(i.Use(stdlib.Symbols), i.Use(yunsafe.Symbols), i.Use(ysyscall.Symbols))
	} else {
		err = i.Use(safeSymbols())
	}
	if err == nil {
		err = i.Use(bound(opts))
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
	_, err = i.EvalPath(path)
	if err != nil {
		return translate(path, err, stderr.String())
	}
	if !ran {
		return &ScriptError{Pos: path, Msg: "the script ran no experiment (does main call Run?)"}
	}
	return nil
}

// bound are tally's symbols with sim.New bound to this run's options.
func bound(opts *sim.Options) interp.Exports {
	out := interp.Exports{}
	for k, v := range symbols.Symbols {
		out[k] = v
	}
	key := "tally/runtime/sim/sim"
	simSyms := map[string]reflect.Value{}
	for k, v := range symbols.Symbols[key] {
		simSyms[k] = v
	}
	simSyms["New"] = reflect.ValueOf(func(name string) *sim.Experiment { return sim.NewWith(name, opts) })
	out[key] = simSyms
	return out
}

var posRE = regexp.MustCompile(`^(.*?):(\d+):(\d+): (.*)$`)

// translate turns an interpreter error into a ScriptError at the script's position.
func translate(path string, err error, stderr string) error {
	var pn interp.Panic
	if errors.As(err, &pn) {
		if e, ok := pn.Value.(error); ok && errors.Is(e, sim.ErrInterrupted) {
			return sim.ErrInterrupted
		}
		msg := fmt.Sprint(pn.Value)
		// The interpreter prints the script position of each frame the panic left; the first
		// line is the innermost one.
		for _, line := range strings.Split(stderr, "\n") {
			if m := posRE.FindStringSubmatch(line); m != nil && strings.HasPrefix(m[4], "panic") {
				return &ScriptError{Pos: position(path, m[1], m[2], m[3]), Msg: msg}
			}
		}
		return &ScriptError{Pos: path, Msg: msg}
	}
	s := err.Error()
	if m := posRE.FindStringSubmatch(firstLine(s)); m != nil {
		return &ScriptError{Pos: position(path, m[1], m[2], m[3]), Msg: strings.TrimSpace(m[4])}
	}
	return &ScriptError{Pos: path, Msg: s}
}

func position(path, file, line, col string) string {
	if file == "" || filepath.Base(file) == filepath.Base(path) || strings.HasPrefix(file, "_") {
		file = path
	}
	return file + ":" + line + ":" + col
}

func firstLine(s string) string {
	if i := strings.IndexByte(s, '\n'); i >= 0 {
		return s[:i]
	}
	return s
}
