package host

import (
	"fmt"
	"go/ast"
	"go/token"
	"go/types"
	"strings"

	"github.com/traefik/yaegi/stdlib"

	"tally/runtime/host/symbols"
)

// The interpreter (yaegi v0.16) runs some valid Go differently from the compiler, or not at
// all. After the type check the host looks for those constructs in the script: where an exact
// rewrite exists it makes it (same line, so positions hold), elsewhere it refuses the script
// with a plain sentence at the line, rather than let a run give another table than go run or
// crash the interpreter. What a look at the source cannot catch is listed in DEVELOPERS.md.

// prepared is a type-checked script ready for the interpreter.
type prepared struct {
	src   []byte      // the text to run: the script's, or a copy with some declarations blanked out
	fixes []insertion // what gives the interpreter Go's semantics
	// generic names, by line, the generic functions and types the script uses there.
	generic map[int][]generic
}

// prepare type-checks the script, refuses what the interpreter would run differently from Go,
// and returns what it is to run.
func prepare(fset *token.FileSet, f *ast.File, path string, src []byte) (*prepared, error) {
	info, err := typeCheck(fset, f, path)
	if err != nil {
		return nil, err
	}
	if info == nil {
		return &prepared{src: src}, nil
	}
	d := &deviations{fset: fset, info: info, path: path, src: src}
	d.inspect(f)
	if d.err != nil {
		return nil, d.err
	}
	p := &prepared{src: d.src, fixes: d.ins, generic: map[int][]generic{}}
	for id, inst := range info.Instances {
		at := fset.Position(id.Pos())
		what := "generic function "
		if _, ok := inst.Type.(*types.Named); ok {
			what = "generic type "
		}
		p.generic[at.Line] = append(p.generic[at.Line], generic{at.Column, what + id.Name})
	}
	return p, nil
}

// generic is a use of a generic function or type, at a column.
type generic struct {
	col  int
	what string
}

// unsupported is the message for valid Go (the type check passed) that the interpreter refuses
// at line:col. Its support for generics is partial, the usual cause: the message names the use
// of a generic function or type nearest before col on the line.
func (p *prepared) unsupported(line, col int) string {
	what := "this line"
	if p != nil {
		var best *generic
		for i, g := range p.generic[line] {
			before := g.col <= col
			if best == nil || before && (best.col > col || g.col > best.col) {
				best = &p.generic[line][i]
			}
		}
		if best != nil {
			return "the interpreter cannot run the " + best.what + " here, which Go accepts (its support for generics is partial): run the script compiled with go run, or write it without"
		}
	}
	return "the interpreter cannot run " + what + ", which Go accepts: run the script compiled with go run, or write the line another way"
}

type deviations struct {
	fset   *token.FileSet
	info   *types.Info
	path   string
	src    []byte
	copied bool // src is the host's copy
	ins    []insertion
	err    *ScriptError
	errOff int // where err is
}

// refuse records the first construct the interpreter cannot run as Go does.
func (d *deviations) refuse(n ast.Node, format string, args ...any) {
	p := d.fset.Position(n.Pos())
	if d.err == nil || p.Offset < d.errOff {
		d.err = &ScriptError{Pos: fmt.Sprintf("%s:%d:%d", d.path, p.Line, p.Column), Msg: fmt.Sprintf(format, args...)}
		d.errOff = p.Offset
	}
}

func (d *deviations) inspect(f *ast.File) {
	ast.PreorderStack(f, nil, func(n ast.Node, stack []ast.Node) bool {
		switch n := n.(type) {
		case *ast.RangeStmt:
			d.rangeStmt(n)
		case *ast.ForStmt:
			d.forStmt(n)
		case *ast.Ident:
			if b, ok := d.info.Uses[n].(*types.Builtin); ok {
				switch b.Name() {
				case "min", "max":
					d.refuse(n, "the interpreter lacks the built-in %s (Go 1.21): use math.%s for floats, or an if", b.Name(), strings.ToUpper(b.Name()[:1])+b.Name()[1:])
				case "clear":
					d.refuse(n, "the interpreter lacks the built-in clear (Go 1.21): delete the keys in a loop, or zero the elements")
				}
			}
		case *ast.SelectorExpr:
			d.selector(n, stack)
		case *ast.DeclStmt:
			d.blankVar(n)
		}
		return true
	})
}

// selector refuses package members the interpreter does not carry, method expressions, and
// method values that Go binds to a copy of a variable and the interpreter to the variable.
func (d *deviations) selector(n *ast.SelectorExpr, stack []ast.Node) {
	if id, ok := n.X.(*ast.Ident); ok {
		if pn, ok := d.info.Uses[id].(*types.PkgName); ok {
			d.member(n, pn.Imported(), n.Sel.Name)
			return
		}
	}
	sel := d.info.Selections[n]
	if sel == nil {
		return
	}
	name := types.ExprString(n)
	switch sel.Kind() {
	case types.MethodExpr:
		d.refuse(n, "the interpreter cannot run the method expression %s: write a function literal that calls the method", name)
	case types.MethodVal:
		if len(stack) > 0 {
			if call, ok := stack[len(stack)-1].(*ast.CallExpr); ok && call.Fun == n {
				return // a call, not a method value
			}
		}
		sig := sel.Obj().Type().(*types.Signature)
		if _, ptr := sig.Recv().Type().(*types.Pointer); ptr || types.IsInterface(sig.Recv().Type()) || !variable(d.info, n.X) {
			return
		}
		d.refuse(n, "the interpreter binds the method value %s to the variable %s, where Go binds a copy made here: copy the receiver into a variable that stays as it is and call the method on it in a function literal", name, types.ExprString(n.X))
	}
}

// variable reports whether e denotes a variable (or what a pointer variable points to), whose
// value may change after a method value is taken from it.
func variable(info *types.Info, e ast.Expr) bool {
	switch e := ast.Unparen(e).(type) {
	case *ast.Ident:
		_, ok := info.Uses[e].(*types.Var)
		return ok
	case *ast.SelectorExpr, *ast.IndexExpr, *ast.StarExpr:
		return true
	}
	return false
}

// member refuses a package member missing from the interpreter's tables: a generic function or
// type of the standard library (the interpreter carries none), or one newer than it.
func (d *deviations) member(n *ast.SelectorExpr, pkg *types.Package, name string) {
	if pkg.Path() == "unsafe" {
		return
	}
	key := pkg.Path() + "/" + pkg.Name()
	table, ok := symbols.Symbols[key]
	if !ok {
		table = stdlib.Symbols[key]
	}
	if _, ok := table[name]; ok {
		return
	}
	what := "it"
	switch o := pkg.Scope().Lookup(name).(type) {
	case *types.Func:
		if o.Type().(*types.Signature).TypeParams().Len() > 0 {
			what = "a generic function, which it cannot call"
		}
	case *types.TypeName:
		if named, ok := o.Type().(*types.Named); ok && named.TypeParams().Len() > 0 {
			what = "a generic type, which it cannot use"
		} else if in, ok := o.Type().Underlying().(*types.Interface); ok && !in.IsMethodSet() {
			what = "a constraint for generic code, which it cannot use"
		}
	}
	if what == "it" {
		what = "newer than the interpreter"
	}
	d.refuse(n, "the interpreter does not carry %s.%s (%s): write it out, or run the script compiled with go run", pkg.Name(), name, what)
}

// rangeStmt refuses ranges the interpreter cannot run, and gives range variables that a
// function literal or a pointer keeps their own copy per iteration, as Go 1.22 does.
func (d *deviations) rangeStmt(n *ast.RangeStmt) {
	if tv, ok := d.info.Types[n.X]; ok {
		switch u := tv.Type.Underlying().(type) {
		case *types.Basic:
			if u.Info()&types.IsInteger != 0 {
				d.refuse(n, "the interpreter cannot range over an integer (Go 1.22): write for i := 0; i < n; i++")
				return
			}
		case *types.Signature:
			d.refuse(n, "the interpreter cannot range over a function (Go 1.23): call the function with a function literal")
			return
		}
	}
	if n.Tok != token.DEFINE {
		return
	}
	var vars []string
	for _, e := range []ast.Expr{n.Key, n.Value} {
		if id, ok := e.(*ast.Ident); ok && id.Name != "_" && d.captured(d.info.Defs[id], n.Body) {
			vars = append(vars, id.Name)
		}
	}
	d.copyAtStart(n.Body, vars)
}

// forStmt gives the variables of a three-clause loop that a function literal or a pointer keeps
// their own copy per iteration, as Go 1.22 does. The copy is exact when the body does not
// assign the variable; a loop that does both is refused.
func (d *deviations) forStmt(n *ast.ForStmt) {
	init, ok := n.Init.(*ast.AssignStmt)
	if !ok || init.Tok != token.DEFINE {
		return
	}
	var vars []string
	for _, e := range init.Lhs {
		id, ok := e.(*ast.Ident)
		if !ok || id.Name == "_" {
			continue
		}
		v := d.info.Defs[id]
		if !d.captured(v, n.Body) {
			continue
		}
		if at := d.assigned(v, n.Body); at != nil {
			d.refuse(at, "the interpreter shares one %s among the iterations of this loop, where Go gives each its own; a function literal or a pointer keeps it and the loop body changes it: copy it into a new variable and keep the copy", id.Name)
			return
		}
		vars = append(vars, id.Name)
	}
	d.copyAtStart(n.Body, vars)
}

// copyAtStart inserts "v := v" for each name at the start of the loop body.
func (d *deviations) copyAtStart(body *ast.BlockStmt, vars []string) {
	if len(vars) == 0 {
		return
	}
	p := d.fset.Position(body.Lbrace)
	text := " " + strings.Join(vars, ", ") + " := " + strings.Join(vars, ", ") + ";"
	d.ins = append(d.ins, insertion{p.Offset + 1, p.Line, p.Column + 1, text})
}

// captured reports whether v is used in a function literal inside body, or has its address
// taken there.
func (d *deviations) captured(v types.Object, body ast.Node) bool {
	if v == nil {
		return false
	}
	found := false
	ast.PreorderStack(body, nil, func(n ast.Node, stack []ast.Node) bool {
		if found {
			return false
		}
		switch n := n.(type) {
		case *ast.FuncLit:
			found = d.uses(v, n)
			return false
		case *ast.UnaryExpr:
			if n.Op == token.AND && d.uses(v, n.X) {
				found = true
			}
		}
		return true
	})
	return found
}

func (d *deviations) uses(v types.Object, n ast.Node) bool {
	found := false
	ast.Inspect(n, func(n ast.Node) bool {
		if id, ok := n.(*ast.Ident); ok && d.info.Uses[id] == v {
			found = true
		}
		return !found
	})
	return found
}

// assigned returns a statement in body that assigns v, or nil.
func (d *deviations) assigned(v types.Object, body ast.Node) ast.Node {
	var at ast.Node
	ast.Inspect(body, func(n ast.Node) bool {
		if at != nil {
			return false
		}
		switch s := n.(type) {
		case *ast.AssignStmt:
			if s.Tok != token.DEFINE {
				for _, e := range s.Lhs {
					if id, ok := ast.Unparen(e).(*ast.Ident); ok && d.info.Uses[id] == v {
						at = s
					}
				}
			}
		case *ast.IncDecStmt:
			if id, ok := ast.Unparen(s.X).(*ast.Ident); ok && d.info.Uses[id] == v {
				at = s
			}
		}
		return at == nil
	})
	return at
}

// blankVar blanks out (spaces, same length) a local "var _ T" without a value, which has no
// effect once the type check has passed and which the interpreter refuses.
func (d *deviations) blankVar(n *ast.DeclStmt) {
	g, ok := n.Decl.(*ast.GenDecl)
	if !ok || g.Tok != token.VAR {
		return
	}
	var blank []ast.Node
	for _, s := range g.Specs {
		vs := s.(*ast.ValueSpec)
		if len(vs.Values) > 0 {
			continue
		}
		all := true
		for _, id := range vs.Names {
			all = all && id.Name == "_"
		}
		if all {
			blank = append(blank, vs)
		}
	}
	if len(blank) == 0 {
		return
	}
	if len(blank) == len(g.Specs) {
		blank = []ast.Node{g}
	}
	if !d.copied {
		d.src = append([]byte(nil), d.src...)
		d.copied = true
	}
	for _, b := range blank {
		from, to := d.fset.Position(b.Pos()).Offset, d.fset.Position(b.End()).Offset
		for i := from; i < to; i++ {
			if d.src[i] != '\n' {
				d.src[i] = ' '
			}
		}
	}
}
