package host

import (
	"fmt"
	"go/parser"
	"go/token"
	"maps"
	"sort"
	"strconv"
	"strings"

	"github.com/traefik/yaegi/interp"
	"github.com/traefik/yaegi/stdlib"

	"tally/runtime/host/symbols"
)

// Safe are the standard-library packages a sandboxed script may import: computation and text,
// nothing that reaches files, the network, other processes, the system or memory directly.
// math/rand is left out on purpose: randomness comes from the block's stream, or the run would
// not be reproducible.
var Safe = []string{
	"bytes", "cmp", "container/heap", "container/list", "container/ring", "encoding/binary",
	"errors", "fmt", "hash/crc32", "hash/crc64", "maps", "math", "math/big", "math/bits",
	"math/cmplx", "slices", "sort", "strconv", "strings", "time", "unicode", "unicode/utf8",
}

// TrustFlag is the command-line flag that lifts the sandbox.
const TrustFlag = "-trust"

func safe(path string) bool {
	for _, p := range Safe {
		if p == path {
			return true
		}
	}
	return false
}

// tallyPackage reports whether path is one of tally's script-facing packages.
func tallyPackage(path string) bool {
	_, ok := symbols.Symbols[path+"/"+path[strings.LastIndex(path, "/")+1:]]
	return ok
}

// checkImports refuses, with the import's position, what a sandboxed script may not import,
// and anything that is neither tally's nor the standard library's.
func checkImports(path string, src []byte, trust bool) error {
	fset := token.NewFileSet()
	f, err := parser.ParseFile(fset, path, src, parser.ImportsOnly)
	if err != nil {
		return translate(path, err, nil)
	}
	for _, im := range f.Imports {
		p, _ := strconv.Unquote(im.Path.Value)
		pos := fset.Position(im.Path.Pos())
		switch {
		case tallyPackage(p):
		case strings.HasPrefix(p, "tally/"):
			return &ScriptError{Pos: pos.String(), Msg: fmt.Sprintf("package %q is not one scripts can use (script-facing: %s)", p, strings.Join(tallyPackages(), ", "))}
		case safe(p):
		case trust && stdPackage(p):
		case trust:
			return &ScriptError{Pos: pos.String(), Msg: fmt.Sprintf("package %q is neither tally's nor the standard library's; the interpreter cannot load it (run the script with go run instead)", p)}
		default:
			return &ScriptError{Pos: pos.String(), Msg: fmt.Sprintf("import %q is not allowed in a sandboxed script (allowed: tally's packages and %s); run with %s to lift the sandbox for a script you trust", p, strings.Join(Safe, ", "), TrustFlag)}
		}
	}
	return nil
}

// CheckImports is the sandbox's import check of a script, for a program built from it (a run
// handed over to the compiled script): refused is what the interpreter refuses.
func CheckImports(path string, src []byte, trust bool) error { return checkImports(path, src, trust) }

func stdPackage(p string) bool {
	if p == "unsafe" {
		return true
	}
	_, ok := stdlib.Symbols[p+"/"+p[strings.LastIndex(p, "/")+1:]]
	return ok
}

func tallyPackages() []string {
	var ps []string
	for k := range symbols.Symbols {
		ps = append(ps, k[:strings.LastIndex(k, "/")])
	}
	sort.Strings(ps)
	return ps
}

// withheld are functions of the safe packages a sandboxed script does not get:
// time.LoadLocation opens a file named by its argument.
var withheld = map[string][]string{"time/time": {"LoadLocation"}}

// safeSymbols is the part of the standard library's tables a sandboxed script gets.
func safeSymbols() interp.Exports {
	out := interp.Exports{}
	for k, v := range stdlib.Symbols {
		if i := strings.LastIndex(k, "/"); i > 0 && safe(k[:i]) {
			if w := withheld[k]; w != nil {
				v = maps.Clone(v)
				for _, name := range w {
					delete(v, name)
				}
			}
			out[k] = v
		}
	}
	return out
}
