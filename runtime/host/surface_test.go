package host

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	goconstant "go/constant"
	"os"
	"path/filepath"
	"reflect"
	"slices"
	"sort"
	"strings"
	"testing"

	"github.com/traefik/yaegi/interp"

	"tally/runtime/host/symbols"
	"tally/runtime/internal/runner"
	"tally/runtime/result"
)

// The script surface: every symbol the interpreter is given (tally's generated tables, with
// sim.New bound to a run as Run binds it, the host's position markers, and the sandbox's part
// of the standard library) may reach nothing through which a script could choose where
// outputs go, forge the run record, set how the run is made, or control the process.
//
// How it decides (common practice for capability checks, no source): from each symbol it walks
// every type a script can get hold of — a function's parameters and results, a type's exported
// fields, the exported methods of the type and of its pointer, element, key and interface
// method types — and fails when one of them is
//
//   - a type of a package behind the surface: the run record (runtime/result), the run's
//     options and executor (runtime/internal/…), the engine, long-run files, writers, host,
//     watcher; or a package of files, processes, the network or memory (os, os/exec, syscall,
//     net, io/fs, runtime, reflect, unsafe, plugin), or an unsafe.Pointer;
//   - a type, function, method or field of tally's named like an options struct (Options,
//     Settings, Config), like the host's hooks and controls (NewWith, Hosted, Execute,
//     Failure, Where, Done, Exit, Context, Log), or like a place or record field (OutputDir,
//     Dir, Path, File, Script, Source, Mode, Workers, Long, Resume, Restart, Checkpoint,
//     Replay, ErrInterrupted);
//   - an exported variable of tally's that is not on the short list of read-only-by-intent
//     block data below (a variable is state shared with the host: a script could reassign
//     the sentinel the host compares an interrupted run with);
//   - a standard function that opens a file by name (time.LoadLocation).
//
// The walker is itself tested on a surface that has each of these (TestSurfaceWalkerFinds).
func TestScriptSurfaceReachesNothingBehind(t *testing.T) {
	exports := interp.Exports{}
	for k, v := range bound(&runner.Options{}) {
		exports[k] = v
	}
	for k, v := range safeSymbols() {
		exports[k] = v
	}
	for k, v := range (&marks{}).exports() { // the position markers the host inserts
		exports[k] = v
	}
	if len(exports) < len(symbols.Symbols)+len(Safe)+1 {
		t.Fatalf("%d packages given to the interpreter, want at least %d", len(exports), len(symbols.Symbols)+len(Safe))
	}
	if bad := reachable(exports); len(bad) > 0 {
		t.Errorf("the script surface reaches what is behind it:\n%s", strings.Join(bad, "\n"))
	}
	// sim itself: declarations only.
	var names []string
	for n := range symbols.Symbols["tally/runtime/sim/sim"] {
		names = append(names, n)
	}
	sort.Strings(names)
	if want := []string{"Axis", "Choice", "Curve", "DefaultSeed", "Experiment", "New", "Point", "Range"}; !slices.Equal(names, want) {
		t.Errorf("package sim exports %v, want %v", names, want)
	}
}

// The walker finds each kind of thing it looks for: it flags a surface like the old one.
func TestSurfaceWalkerFinds(t *testing.T) {
	bad := interp.Exports{"tally/fake/fake": {
		"NewWith": reflect.ValueOf(func(string, *struct{ Script string }) {}),
		"Options": reflect.ValueOf((*runner.Options)(nil)),
		"Record":  reflect.ValueOf(func() *result.Run { return nil }),
		"Err":     reflect.ValueOf(&runner.ErrInterrupted).Elem(),
		"Ok":      reflect.ValueOf(func(x int) int { return x }),
	}}
	got := strings.Join(reachable(bad), "\n")
	for _, want := range []string{"fake.NewWith: named NewWith", "fake.NewWith: field Script", "fake.Options: type of tally/runtime/internal/runner",
		"fake.Record: type of tally/runtime/result", "fake.Err: an exported variable"} {
		if !strings.Contains(got, want) {
			t.Errorf("the walker missed %q; it found:\n%s", want, got)
		}
	}
	if strings.Contains(got, "fake.Ok") {
		t.Errorf("the walker flagged a harmless function:\n%s", got)
	}
}

// deniedPackages are packages no symbol may reach a type of (a prefix ending in "/" covers the
// packages below).
var deniedPackages = []string{
	"tally/runtime/internal/", "tally/runtime/result", "tally/runtime/engine", "tally/runtime/longrun",
	"tally/runtime/output", "tally/runtime/host", "tally/runtime/watch", "tally/runtime/progress",
	"tally/runtime/bench", "tally/runtime/lab", "tally/cmd/",
	"os", "os/", "syscall", "net", "net/", "io/fs", "runtime", "runtime/", "reflect", "unsafe", "plugin",
}

// wrappers are the packages of the interpreter's own interface adapters (generated beside
// the tables); they are walked, not refused.
var wrappers = []string{"tally/runtime/host/symbols", "github.com/traefik/yaegi/"}

// deniedNames are exported identifiers of tally's (symbols, types, methods, fields) that name an
// options struct, a hook or control of the host, or a place or record field.
var deniedNames = map[string]bool{
	"Options": true, "Settings": true, "Config": true,
	"NewWith": true, "Hosted": true, "Execute": true, "Failure": true, "Where": true, "Done": true,
	"Exit": true, "Context": true, "Log": true,
	"OutputDir": true, "Dir": true, "Path": true, "File": true, "Script": true, "Source": true, "Mode": true,
	"Workers": true, "Long": true, "Resume": true, "Restart": true, "Checkpoint": true, "Replay": true,
	"ErrInterrupted": true,
}

// blockData are tally's exported variables a script may read: published model parameters and
// tables that configure only the script's own link or theory curve.
var blockData = map[string]bool{
	"impair.SalehPublished": true, // Saleh's published amplifier fit
	"stats.Methods":         true, // the names of the interval methods
	"theory.ConvK7":         true, // the distance spectrum of the K = 7 code
}

// deniedStd are standard functions in the safe packages that open a file by name.
var deniedStd = map[string]bool{"time.LoadLocation": true}

func deniedPackage(path string) bool {
	for _, w := range wrappers {
		if path == w || strings.HasPrefix(path, w) {
			return false
		}
	}
	for _, d := range deniedPackages {
		if path == d || strings.HasSuffix(d, "/") && strings.HasPrefix(path, d) {
			return true
		}
	}
	return false
}

func tallyPath(path string) bool { return strings.HasPrefix(path, "tally/") }

// reachable lists what the exports reach that they must not, one line each.
func reachable(exports interp.Exports) []string {
	var bad []string
	for key, syms := range exports {
		pkg := key[:strings.LastIndex(key, "/")]
		short := pkg[strings.LastIndex(pkg, "/")+1:]
		for name, v := range syms {
			at := short + "." + name
			w := walker{seen: map[reflect.Type]bool{}, at: at, bad: &bad, tally: tallyPath(pkg)}
			if tallyPath(pkg) && deniedNames[strings.TrimPrefix(name, "_")] {
				w.flag("named %s", name)
			}
			if deniedStd[at] {
				w.flag("opens a file by name")
			}
			switch {
			case !v.IsValid():
			case isConstant(v):
			case v.CanSet(): // a variable
				if tallyPath(pkg) && !blockData[at] {
					w.flag("an exported variable of type %s (state shared with the host)", v.Type())
				}
				w.walk(v.Type())
			case v.Kind() == reflect.Pointer && v.IsNil(): // a type
				w.walk(v.Type().Elem())
			default:
				w.walk(v.Type())
			}
		}
	}
	sort.Strings(bad)
	return slices.Compact(bad)
}

func isConstant(v reflect.Value) bool {
	if !v.CanInterface() {
		return false
	}
	_, ok := v.Interface().(goconstant.Value)
	return ok
}

type walker struct {
	seen  map[reflect.Type]bool
	at    string
	bad   *[]string
	tally bool // the symbol is tally's: names of unnamed types it reaches are checked too
}

func (w *walker) flag(format string, a ...any) {
	*w.bad = append(*w.bad, w.at+": "+fmt.Sprintf(format, a...))
}

func (w *walker) walk(t reflect.Type) {
	if w.seen[t] {
		return
	}
	w.seen[t] = true
	if t.Kind() == reflect.UnsafePointer {
		w.flag("unsafe.Pointer")
		return
	}
	if p := t.PkgPath(); p != "" {
		if deniedPackage(p) {
			w.flag("type of %s (%s)", p, t)
			return
		}
		if tallyPath(p) && deniedNames[t.Name()] {
			w.flag("type named %s (%s)", t.Name(), t)
		}
	}
	tally := tallyPath(t.PkgPath()) || w.tally && t.Name() == ""
	switch t.Kind() {
	case reflect.Pointer, reflect.Slice, reflect.Array, reflect.Chan:
		w.walk(t.Elem())
	case reflect.Map:
		w.walk(t.Key())
		w.walk(t.Elem())
	case reflect.Func:
		for i := range t.NumIn() {
			w.walk(t.In(i))
		}
		for i := range t.NumOut() {
			w.walk(t.Out(i))
		}
	case reflect.Struct:
		for i := range t.NumField() {
			f := t.Field(i)
			if !f.IsExported() && !f.Anonymous {
				continue
			}
			if tally && deniedNames[f.Name] {
				w.flag("field %s of %s", f.Name, t)
			}
			w.walk(f.Type)
		}
	case reflect.Interface:
		for i := range t.NumMethod() {
			w.method(t, t.Method(i), tally, 0)
		}
		return
	}
	for _, mt := range []reflect.Type{t, reflect.PointerTo(t)} {
		for i := range mt.NumMethod() {
			w.method(mt, mt.Method(i), tally, 1)
		}
	}
}

// method walks a method's signature; skip is 1 when its type has the receiver first.
func (w *walker) method(t reflect.Type, m reflect.Method, tally bool, skip int) {
	if !m.IsExported() {
		return
	}
	if tally && deniedNames[m.Name] {
		w.flag("method %s of %s", m.Name, t)
	}
	ft := m.Type
	for i := skip; i < ft.NumIn(); i++ {
		w.walk(ft.In(i))
	}
	for i := range ft.NumOut() {
		w.walk(ft.Out(i))
	}
}

// The escape the old surface allowed: a sandboxed script that names the run's options to put
// outputs elsewhere, or forge the record, is refused before anything runs, and writes nothing.
func TestScriptCannotChooseOutputsOrRecord(t *testing.T) {
	dir := t.TempDir()
	elsewhere := filepath.Join(dir, "elsewhere")
	for _, body := range []string{
		`sim.NewWith("x", &sim.Options{Script: "` + filepath.Join(elsewhere, "f.go") + `"}).Run()`,
		`x := sim.New("x"); x.Execute()`,
		`println(sim.OutputDir("a.go"))`,
		`sim.Hosted()`,
		`sim.ErrInterrupted = nil`,
	} {
		p := filepath.Join(dir, "escape.go")
		src := "//go:build ignore\n\npackage main\n\nimport \"tally/runtime/sim\"\n\nfunc main() {\n\t" + body + "\n}\n"
		if err := os.WriteFile(p, []byte(src), 0o644); err != nil {
			t.Fatal(err)
		}
		err := Run(context.Background(), p, quiet(1))
		var se *ScriptError
		if !errors.As(err, &se) || !strings.HasPrefix(se.Pos, p+":8:") {
			t.Errorf("%s: %v, want a script error at line 8", body, err)
		}
		for _, d := range []string{elsewhere, filepath.Join(dir, "escape"), filepath.Join(dir, "x")} {
			if _, err := os.Stat(d); err == nil {
				t.Errorf("%s: %s was created", body, d)
			}
		}
	}
}

// A script runs one experiment: the first writes its outputs, a second Run is refused at its
// line with a message that says why and what to do, and leaves the first's outputs as written.
func TestSecondExperimentRefused(t *testing.T) {
	p := scriptIn(t, "custom.go")
	src, _ := os.ReadFile(p)
	two := strings.Replace(string(src), "\tx.Run()\n}", "\tx.Run()\n\ty := sim.New(\"second\")\n\ty.Sweep(\"ebn0_db\", 1)\n\ty.Link(func(p sim.Point) *link.Link { return nil })\n\ty.Run()\n}", 1)
	if err := os.WriteFile(p, []byte(two), 0o644); err != nil {
		t.Fatal(err)
	}
	line := strings.Count(two[:strings.Index(two, "\ty.Run()")], "\n") + 1
	err := Run(context.Background(), p, quiet(2))
	var se *ScriptError
	if !errors.As(err, &se) || !strings.HasPrefix(se.Pos, fmt.Sprintf("%s:%d:", p, line)) ||
		!strings.Contains(se.Msg, `already ran the experiment "custom blocks"`) || !strings.Contains(se.Msg, "file of its own") {
		t.Fatalf("second experiment: %v; want a script error at line %d saying a script runs one experiment", err, line)
	}
	if !bytes.Contains(table(t, p), []byte("ebn0_db,ber_trials")) {
		t.Error("the first experiment's table is missing")
	}
}

// A script whose custom block keeps its buffer outside the Link function (shared by every
// worker's link) is refused, interpreted, with one worker too: the message names the block and
// says where buffers belong, and no outputs are written.
func TestLeakingScriptBlockRefused(t *testing.T) {
	p := scriptIn(t, "custom.go")
	src, _ := os.ReadFile(p)
	s := strings.Replace(string(src), "\tx.Link(func(p sim.Point) *link.Link {\n\t\tvar sym []complex128\n\t\tvar hard []byte\n",
		"\tvar hard []byte\n\tx.Link(func(p sim.Point) *link.Link {\n\t\tvar sym []complex128\n", 1)
	if s == string(src) {
		t.Fatal("the test script changed: cannot move its buffer out of Link")
	}
	if err := os.WriteFile(p, []byte(s), 0o644); err != nil {
		t.Fatal(err)
	}
	err := Run(context.Background(), p, quiet(1))
	var se *ScriptError
	if !errors.As(err, &se) || !strings.Contains(se.Msg, `custom block "slice"`) || !strings.Contains(se.Msg, "inside the Link function") {
		t.Fatalf("leaking block: %v; want a script error naming \"slice\"", err)
	}
	if _, err := os.Stat(strings.TrimSuffix(p, ".go")); err == nil {
		t.Error("a refused run wrote outputs")
	}
}

// The packages behind the surface cannot be imported, sandboxed or trusted.
func TestInternalPackagesRefused(t *testing.T) {
	p := filepath.Join(t.TempDir(), "inside.go")
	src := "//go:build ignore\n\npackage main\n\nimport \"tally/runtime/internal/runner\"\n\nfunc main() { runner.Hosted() }\n"
	if err := os.WriteFile(p, []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, trust := range []bool{false, true} {
		cfg := quiet(1)
		cfg.Trust = trust
		err := Run(context.Background(), p, cfg)
		var se *ScriptError
		if !errors.As(err, &se) || !strings.HasPrefix(se.Pos, p+":5:") || !strings.Contains(se.Msg, "not one scripts can use") {
			t.Errorf("trust %v: %v, want the import refused at line 5", trust, err)
		}
	}
}
