package host

import (
	"bytes"
	"errors"
	"fmt"
	"go/ast"
	"go/token"
	"go/types"
	"regexp"
	"runtime"
	"sort"
	"strconv"
	"strings"
	"sync"

	"golang.org/x/tools/go/gcexportdata"

	"tally/runtime/host/symbols"
)

// One program, two ways: before the interpreter sees a script, the host type-checks it with
// go/types (the Go compiler's checker, with the compiler's messages) against the export data
// of the packages a script may import, generated at build time (symbols/exportgen.go). A file
// the compiler would reject is refused at the compiler's position with the compiler's message,
// so `tally run` and `go run` accept the same files.

// exportData is the parsed symbols.ExportData.
type exportData struct {
	goVersion string            // go1.26
	platform  string            // linux/amd64
	pkgs      map[string][]byte // import path: gcexportdata for it
}

var exports = sync.OnceValues(func() (*exportData, error) { return parseExportData(symbols.ExportData()) })

func parseExportData(b []byte) (*exportData, error) {
	bad := errors.New("host: the embedded export data is damaged: run go generate ./runtime/host/symbols")
	line := func() (string, bool) {
		i := bytes.IndexByte(b, '\n')
		if i < 0 {
			return "", false
		}
		s := string(b[:i])
		b = b[i+1:]
		return s, true
	}
	if s, ok := line(); !ok || s != "tally export data" {
		return nil, bad
	}
	s, ok := line()
	if !ok {
		return nil, bad
	}
	d := &exportData{pkgs: map[string][]byte{}}
	d.goVersion, d.platform, _ = strings.Cut(s, " ")
	for len(b) > 0 {
		s, ok := line()
		if !ok {
			return nil, bad
		}
		path, size, _ := strings.Cut(s, " ")
		n, err := strconv.Atoi(size)
		if err != nil || n < 0 || n > len(b) {
			return nil, bad
		}
		d.pkgs[path] = b[:n:n]
		b = b[n:]
	}
	return d, nil
}

// importer serves packages from the export data, each read once per check.
type importer struct {
	fset *token.FileSet
	data *exportData
	pkgs map[string]*types.Package
}

func (im *importer) Import(path string) (*types.Package, error) {
	if path == "unsafe" {
		return types.Unsafe, nil
	}
	if p := im.pkgs[path]; p != nil && p.Complete() {
		return p, nil
	}
	b, ok := im.data.pkgs[path]
	if !ok {
		return nil, fmt.Errorf("package %s is not in std", path)
	}
	return gcexportdata.Read(bytes.NewReader(b), im.fset, im.pkgs, path)
}

// portable reports whether the package has the same API on every 64-bit platform: tally's
// packages and the sandbox's standard ones.
func portable(path string) bool { return safe(path) || tallyPackage(path) }

// typeCheck refuses, at the compiler's position and with its message, a script the Go compiler
// would reject. Errors are reported in the compiler's order (by position); the first is
// returned. A script whose imports the export data cannot serve on this platform (a -trust
// script importing a platform-specific package on other than the platform the data was made
// for) is left to the interpreter's own checks.
func typeCheck(fset *token.FileSet, f *ast.File, path string) (*types.Info, error) {
	data, err := exports()
	if err != nil {
		return nil, err
	}
	if data.platform != runtime.GOOS+"/"+runtime.GOARCH {
		for _, im := range f.Imports {
			if p, _ := strconv.Unquote(im.Path.Value); p != "unsafe" && !portable(p) {
				return nil, nil
			}
		}
	}
	info := &types.Info{
		Types:      map[ast.Expr]types.TypeAndValue{},
		Defs:       map[*ast.Ident]types.Object{},
		Uses:       map[*ast.Ident]types.Object{},
		Selections: map[*ast.SelectorExpr]*types.Selection{},
		Instances:  map[*ast.Ident]types.Instance{},
	}
	var errs []types.Error
	conf := types.Config{
		Importer: &importer{fset: fset, data: data, pkgs: map[string]*types.Package{}},
		Sizes:    types.SizesFor("gc", runtime.GOARCH),
		Error: func(err error) {
			if e, ok := err.(types.Error); ok {
				errs = append(errs, e)
			}
		},
	}
	_, err = conf.Check("main", fset, []*ast.File{f}, info)
	if err == nil {
		return info, nil
	}
	if len(errs) == 0 {
		return nil, &ScriptError{Pos: path, Msg: err.Error()}
	}
	sort.SliceStable(errs, func(i, j int) bool { return errs[i].Pos < errs[j].Pos })
	e := errs[0]
	p := fset.Position(e.Pos)
	return nil, &ScriptError{Pos: fmt.Sprintf("%s:%d:%d", path, p.Line, p.Column), Msg: compilerWording(e.Msg)}
}

// compilerWording gives the few go/types messages the compiler words otherwise (it checks
// labels in its parser) the compiler's wording.
func compilerWording(msg string) string {
	for _, w := range wordings {
		if m := w.re.FindStringSubmatch(msg); m != nil {
			return fmt.Sprintf(w.compiler, m[1])
		}
	}
	return msg
}

var wordings = []struct {
	re       *regexp.Regexp
	compiler string
}{
	{regexp.MustCompile(`^label (\S+) declared and not used$`), "label %s defined and not used"},
	{regexp.MustCompile(`^label (\S+) not declared$`), "label %s not defined"},
}
