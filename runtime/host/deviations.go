package host

import (
	"fmt"
	"go/ast"
	"go/token"
	"go/types"
	"sort"
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
	d := &deviations{fset: fset, info: info, path: path, src: src, file: f}
	d.inspect(f)
	d.optionalInterfaces(f)
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
	fset    *token.FileSet
	file    *ast.File
	info    *types.Info
	path    string
	src     []byte
	copied  bool // src is the host's copy
	ins     []insertion
	err     *ScriptError
	errOff  int // where err is
	hoisted int // deferred values given names so far
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
		case *ast.DeferStmt:
			d.deferStmt(n)
		case *ast.CallExpr:
			d.printCall(n)
			d.variadicCall(n)
		case *ast.FuncLit:
			d.loopClosure(n, stack)
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
		if id, ok := ast.Unparen(n.X).(*ast.Ident); ok && !d.changed(d.info.Uses[id]) {
			if _, ptr := d.info.Types[id].Type.Underlying().(*types.Pointer); !ptr {
				return // a variable that never changes: its copy and itself are alike
			}
		}
		d.refuse(n, "the interpreter binds the method value %s to the variable %s, where Go binds a copy made here, and %s changes later: take the method value from a copy that does not change", name, types.ExprString(n.X), types.ExprString(n.X))
	}
}

// changed reports whether the script assigns v (or a field or element of it) after declaring
// it, takes its address, or calls a method with a pointer receiver on it.
func (d *deviations) changed(v types.Object) bool {
	rooted := func(e ast.Expr) bool {
		for {
			switch x := e.(type) {
			case *ast.Ident:
				return d.info.Uses[x] == v
			case *ast.SelectorExpr:
				e = x.X
			case *ast.IndexExpr:
				e = x.X
			case *ast.ParenExpr:
				e = x.X
			default:
				return false
			}
		}
	}
	found := false
	ast.Inspect(d.file, func(n ast.Node) bool {
		switch s := n.(type) {
		case *ast.AssignStmt:
			for _, e := range s.Lhs {
				found = found || rooted(e)
			}
		case *ast.IncDecStmt:
			found = found || rooted(s.X)
		case *ast.RangeStmt:
			if s.Tok == token.ASSIGN {
				for _, e := range []ast.Expr{s.Key, s.Value} {
					found = found || e != nil && rooted(e)
				}
			}
		case *ast.UnaryExpr:
			found = found || s.Op == token.AND && rooted(s.X)
		case *ast.SelectorExpr:
			if sel := d.info.Selections[s]; sel != nil && sel.Kind() == types.MethodVal {
				_, ptr := sel.Obj().Type().(*types.Signature).Recv().Type().(*types.Pointer)
				_, ptrX := d.info.Types[s.X].Type.Underlying().(*types.Pointer)
				found = found || ptr && !ptrX && rooted(s.X)
			}
		}
		return !found
	})
	return found
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
	d.ins = append(d.ins, insertion{off: p.Offset + 1, line: p.Line, col: p.Column + 1, text: text})
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

// deferStmt makes a deferred call use the function value, receiver and arguments as they are
// at the defer statement, as Go does. The interpreter reads a variable, a field or an element
// only when the deferred call runs, and a value it computed at the defer statement from a
// slot that a loop reuses; a variable declared afresh in a block is the interpreter's own,
// iteration by iteration. So
//
//	defer f(x, t.n)   becomes   { __tally1, __tally2 := x, t.n; defer f(__tally1, __tally2) }
//
// on the same line. Constants stay in place; a deferred call over several lines is refused.
func (d *deviations) deferStmt(n *ast.DeferStmt) {
	call := n.Call
	if call.Ellipsis.IsValid() {
		d.refuse(call.Args[len(call.Args)-1], "the interpreter passes %s as one argument in a deferred call with ...: defer a function literal that makes the call", types.ExprString(call.Args[len(call.Args)-1]))
		return
	}
	if at := d.funcValueCall(call); at != nil {
		d.refuse(at, "the interpreter hangs once deferred code calls a function value (%s): defer a declared function, or call it without defer", types.ExprString(at.Fun))
		return
	}
	var hoist []ast.Expr // what to evaluate at the defer statement
	var recvAddr bool    // the receiver's address is what Go takes here
	recv := ast.Expr(nil)
	if sel, ok := ast.Unparen(call.Fun).(*ast.SelectorExpr); ok {
		if s := d.info.Selections[sel]; s != nil && s.Kind() == types.MethodVal {
			recv = sel.X
			_, ptrRecv := s.Obj().Type().(*types.Signature).Recv().Type().(*types.Pointer)
			_, ptrX := d.info.Types[sel.X].Type.Underlying().(*types.Pointer)
			recvAddr = ptrRecv && !ptrX
		}
	} else if _, lit := call.Fun.(*ast.FuncLit); !lit && d.variableRead(call.Fun) {
		hoist = append(hoist, call.Fun)
	}
	if recv != nil && d.variableRead(recv) {
		hoist = append(hoist, recv)
	}
	for _, a := range call.Args {
		tv := d.info.Types[a]
		if tv.Value != nil || tv.IsNil() || tv.IsType() {
			continue
		}
		if b, ok := tv.Type.(*types.Basic); ok && b.Info()&types.IsUntyped != 0 {
			continue // an untyped comparison: its type comes from the parameter
		}
		if containsFuncLit(a) {
			continue // a function literal holds statements of its own, with their markers
		}
		hoist = append(hoist, a)
	}
	if len(hoist) == 0 {
		return
	}
	from, to := d.fset.Position(n.Pos()), d.fset.Position(n.End())
	if from.Line != to.Line {
		d.refuse(n, "the interpreter evaluates the arguments of a deferred call when it runs, where Go evaluates them at the defer statement: write the deferred call on one line, and tally makes it evaluate them here")
		return
	}
	var names, values []string
	for _, e := range hoist {
		d.hoisted++
		name := fmt.Sprintf("__tally%d", d.hoisted)
		names = append(names, name)
		text := string(d.src[d.fset.Position(e.Pos()).Offset:d.fset.Position(e.End()).Offset])
		if e == recv && recvAddr {
			text = "&(" + text + ")"
		}
		values = append(values, text)
		p, q := d.fset.Position(e.Pos()), d.fset.Position(e.End())
		d.ins = append(d.ins, insertion{off: p.Offset, line: p.Line, col: p.Column, del: q.Offset - p.Offset, text: name})
	}
	d.ins = append(d.ins,
		insertion{off: from.Offset, line: from.Line, col: from.Column, text: "{ " + strings.Join(names, ", ") + " := " + strings.Join(values, ", ") + "; "},
		insertion{off: to.Offset, line: to.Line, col: to.Column, text: " }"})
}

// funcValueCall returns the first call of a function value (not a declared function, a
// method or a function literal) that a deferred call makes: the call itself, or one in the
// deferred function literal's body.
func (d *deviations) funcValueCall(call *ast.CallExpr) *ast.CallExpr {
	isValue := func(c *ast.CallExpr) bool {
		switch f := ast.Unparen(c.Fun).(type) {
		case *ast.FuncLit:
			return false
		case *ast.Ident:
			_, ok := d.info.Uses[f].(*types.Var)
			return ok
		case *ast.SelectorExpr:
			if s := d.info.Selections[f]; s != nil {
				return s.Kind() == types.FieldVal
			}
			_, ok := d.info.Uses[f.Sel].(*types.Var)
			return ok
		case *ast.IndexExpr:
			tv := d.info.Types[f]
			return !tv.IsType() && d.info.Instances[indexIdent(f)].Type == nil
		case *ast.CallExpr, *ast.StarExpr:
			return true
		}
		return false
	}
	if isValue(call) {
		return call
	}
	lit, ok := ast.Unparen(call.Fun).(*ast.FuncLit)
	if !ok {
		return nil
	}
	var at *ast.CallExpr
	ast.Inspect(lit.Body, func(n ast.Node) bool {
		if c, ok := n.(*ast.CallExpr); ok && at == nil && !d.info.Types[c.Fun].IsType() && isValue(c) {
			at = c
		}
		return at == nil
	})
	return at
}

// indexIdent is the name of a generic function instantiated by f (f[T]), or nil.
func indexIdent(f *ast.IndexExpr) *ast.Ident {
	switch x := f.X.(type) {
	case *ast.Ident:
		return x
	case *ast.SelectorExpr:
		return x.Sel
	}
	return nil
}

func containsFuncLit(e ast.Expr) bool {
	found := false
	ast.Inspect(e, func(n ast.Node) bool {
		_, lit := n.(*ast.FuncLit)
		found = found || lit
		return !found
	})
	return found
}

// variableRead reports whether e reads a variable (a field, an element, what a pointer points
// to), which the interpreter would read late in a deferred call.
func (d *deviations) variableRead(e ast.Expr) bool {
	switch x := ast.Unparen(e).(type) {
	case *ast.Ident:
		_, ok := d.info.Uses[x].(*types.Var)
		return ok
	case *ast.SelectorExpr:
		if s := d.info.Selections[x]; s != nil {
			return s.Kind() == types.FieldVal
		}
		_, ok := d.info.Uses[x.Sel].(*types.Var) // a package's variable
		return ok
	case *ast.IndexExpr, *ast.StarExpr:
		return true
	}
	return false
}

// printCall refuses a call of fmt's printing functions that would print otherwise in the
// interpreter: a value of a type the script defines whose String (or Format, GoString) method
// fmt would call, which the interpreter's fmt does not see; and the verbs %T, %+v and %#v on
// values of such types, for which the interpreter prints names of its own.
func (d *deviations) printCall(call *ast.CallExpr) {
	sel, ok := ast.Unparen(call.Fun).(*ast.SelectorExpr)
	if !ok {
		return
	}
	fn, ok := d.info.Uses[sel.Sel].(*types.Func)
	if !ok || fn.Pkg() == nil || fn.Pkg().Path() != "fmt" {
		return
	}
	name := fn.Name()
	if !strings.Contains(name, "rint") && name != "Errorf" {
		return // Sscan and the like
	}
	args := call.Args
	first := 0
	if strings.HasPrefix(name, "F") || strings.HasPrefix(name, "Append") {
		first = 1 // the writer or buffer
	}
	if strings.HasSuffix(name, "f") {
		if len(args) > first {
			if tv := d.info.Types[args[first]]; tv.Value != nil {
				format := tv.Value.ExactString()
				for _, verb := range []string{"%T", "%+v", "%#v"} {
					if strings.Contains(format, verb) {
						for _, a := range args[first+1:] {
							if t := d.scriptType(d.info.Types[a].Type, nil); t != nil {
								d.refuse(a, "the interpreter prints %s with names of its own for the script's type %s, where Go prints the Go names: print the fields you need instead", verb, t.Obj().Name())
								return
							}
						}
					}
				}
			}
		}
		first++
	}
	for _, a := range args[min(first, len(args)):] {
		t := d.scriptType(d.info.Types[a].Type, printMethod)
		if t != nil {
			d.refuse(a, "the interpreter's fmt calls the String, GoString and Format methods of %s otherwise than Go's: print the result of its String method, or the fields, instead", t.Obj().Name())
			return
		}
	}
}

// printMethod reports whether t (a script type, or a pointer to one) has a method fmt looks
// for, String, GoString or Format, with the pointer's methods too: the interpreter's fmt calls
// them when Go's would not, or not when it would, and takes any Format for fmt's.
func printMethod(t types.Type) bool {
	if _, ptr := t.(*types.Pointer); !ptr {
		t = types.NewPointer(t)
	}
	ms := types.NewMethodSet(t)
	for i := 0; i < ms.Len(); i++ {
		switch ms.At(i).Obj().Name() {
		case "String", "GoString", "Format":
			return true
		}
	}
	return false
}

// scriptType returns a type defined in the script that t is or holds (as elements, keys, fields
// or what a pointer points to), and for which match holds of it or of the pointer to it that t
// holds (nil: any), or nil.
func (d *deviations) scriptType(t types.Type, match func(types.Type) bool) *types.Named {
	seen := map[types.Type]bool{}
	var walk func(t types.Type) *types.Named
	walk = func(t types.Type) *types.Named {
		if t == nil || seen[t] {
			return nil
		}
		seen[t] = true
		switch u := types.Unalias(t).(type) {
		case *types.Named:
			if o := u.Obj(); o.Pkg() != nil && o.Pkg().Path() == "main" && (match == nil || match(u)) {
				return u
			}
			if o := u.Obj(); o.Pkg() == nil || o.Pkg().Path() != "main" {
				return nil // another package's type: the interpreter prints it as Go does
			}
			return walk(u.Underlying())
		case *types.Pointer:
			if n, ok := types.Unalias(u.Elem()).(*types.Named); ok && match != nil && match(u) {
				if o := n.Obj(); o.Pkg() != nil && o.Pkg().Path() == "main" {
					return n
				}
			}
			return walk(u.Elem())
		case *types.Slice:
			return walk(u.Elem())
		case *types.Array:
			return walk(u.Elem())
		case *types.Map:
			if n := walk(u.Key()); n != nil {
				return n
			}
			return walk(u.Elem())
		case *types.Struct:
			for i := 0; i < u.NumFields(); i++ {
				if n := walk(u.Field(i).Type()); n != nil {
					return n
				}
			}
		}
		return nil
	}
	return walk(t)
}

// optionalInterfaces refuses a type of the script that implements two of tally's interfaces
// neither of which holds the other, such as link.Block and link.Named. tally's compiled code
// asks a block for the second by a type assertion (link.NameOf, a code's Rate, a block's Err);
// the interpreter hands it the value wrapped as the first alone, so the answer would be no
// where Go's is yes.
func (d *deviations) optionalInterfaces(f *ast.File) {
	var ifaces []*types.TypeName
	seen := map[*types.Package]bool{}
	var visit func(p *types.Package)
	visit = func(p *types.Package) {
		if seen[p] || !strings.HasPrefix(p.Path(), "tally/") {
			return
		}
		seen[p] = true
		for _, name := range p.Scope().Names() {
			if tn, ok := p.Scope().Lookup(name).(*types.TypeName); ok && tn.Exported() {
				if in, ok := tn.Type().Underlying().(*types.Interface); ok && in.NumMethods() > 0 {
					ifaces = append(ifaces, tn)
				}
			}
		}
		for _, q := range p.Imports() {
			visit(q)
		}
	}
	for _, obj := range d.info.Uses {
		if pn, ok := obj.(*types.PkgName); ok {
			visit(pn.Imported())
		}
	}
	sort.Slice(ifaces, func(i, j int) bool {
		a, b := ifaces[i], ifaces[j]
		return a.Pkg().Path() < b.Pkg().Path() || a.Pkg().Path() == b.Pkg().Path() && a.Name() < b.Name()
	})
	for id, obj := range d.info.Defs {
		tn, ok := obj.(*types.TypeName)
		if !ok || tn.Parent() == nil || types.IsInterface(tn.Type()) {
			continue
		}
		var impl []*types.TypeName
		for _, in := range ifaces {
			if types.Implements(types.NewPointer(tn.Type()), in.Type().Underlying().(*types.Interface)) {
				impl = append(impl, in)
			}
		}
		for _, a := range impl {
			for _, b := range impl {
				ia, ib := a.Type().Underlying().(*types.Interface), b.Type().Underlying().(*types.Interface)
				if a == b || types.Implements(ia, ib) || types.Implements(ib, ia) {
					continue
				}
				d.refuse(id, "the interpreter hands tally's compiled code a %s as one interface at a time: passed as %s.%s it is not seen to be a %s.%s too, as Go sees it: keep to one of tally's interfaces per type, or run the script compiled with go run", tn.Name(), a.Pkg().Name(), a.Name(), b.Pkg().Name(), b.Name())
				return
			}
		}
	}
}

// variadicCall refuses a value of a script type passed straight into the ...I parameter (I an
// interface) of tally's compiled code, such as a block of the script's own to link.Chain: the
// interpreter fails there while running. Through a variable of type I it passes.
func (d *deviations) variadicCall(call *ast.CallExpr) {
	var id *ast.Ident
	switch f := ast.Unparen(call.Fun).(type) {
	case *ast.Ident:
		id = f
	case *ast.SelectorExpr:
		id = f.Sel
	default:
		return
	}
	fn, ok := d.info.Uses[id].(*types.Func)
	if !ok || fn.Pkg() == nil || !strings.HasPrefix(fn.Pkg().Path(), "tally/") || call.Ellipsis.IsValid() {
		return
	}
	sig := fn.Type().(*types.Signature)
	if !sig.Variadic() {
		return
	}
	elem := sig.Params().At(sig.Params().Len() - 1).Type().(*types.Slice).Elem()
	if !types.IsInterface(elem) {
		return
	}
	for _, a := range call.Args[min(sig.Params().Len()-1, len(call.Args)):] {
		t := d.info.Types[a].Type
		if t == nil || types.IsInterface(t) {
			continue
		}
		if n := d.scriptType(t, nil); n != nil {
			name := types.TypeString(elem, func(p *types.Package) string { return p.Name() })
			d.refuse(a, "the interpreter cannot pass a %s straight to %s's ...%s: assign it to a variable of type %s first (var b %s = …) and pass that", n.Obj().Name(), fn.Name(), name, name, name)
			return
		}
	}
}

// loopClosure gives a function literal made in a loop its own copies of the loop's variables
// it uses (loop variables and variables declared in the body), as Go does. The interpreter
// shares them among the iterations when the function is handed to compiled code (a theory
// curve or a block built in a loop), even through "v := v"; a call frame of its own per
// iteration keeps them apart, so the literal F is wrapped, on its lines, as
//
//	func() T { v := v; return F }()
//
// with T the literal's type. A captured variable that the loop changes has no such copy and
// is refused.
func (d *deviations) loopClosure(lit *ast.FuncLit, stack []ast.Node) {
	var loop ast.Node    // the outermost loop around lit within its function
	var loops []ast.Node // all of them, innermost first
	for i := len(stack) - 1; i >= 0; i-- {
		switch n := stack[i].(type) {
		case *ast.FuncLit, *ast.FuncDecl:
			i = -1
		case *ast.ForStmt, *ast.RangeStmt:
			loop = n
			loops = append(loops, n)
		case *ast.CallExpr:
			if i == len(stack)-1 && n.Fun == lit {
				return // called at once, in its iteration
			}
		}
	}
	if loop == nil {
		return
	}
	var vars []*types.Var
	seen := map[*types.Var]bool{}
	ast.Inspect(lit.Body, func(n ast.Node) bool {
		id, ok := n.(*ast.Ident)
		if !ok {
			return true
		}
		v, ok := d.info.Uses[id].(*types.Var)
		if !ok || seen[v] || v.Pos() < loop.Pos() || v.Pos() >= loop.End() || v.Pos() >= lit.Pos() && v.Pos() < lit.End() {
			return true
		}
		seen[v] = true
		vars = append(vars, v)
		return true
	})
	if len(vars) == 0 {
		return
	}
	var names []string
	for _, v := range vars {
		if at := d.changedInLoop(v, loop, lit, loops); at != nil {
			d.refuse(at, "the interpreter shares %s among the iterations of this loop with the function literal at line %d (Go gives each iteration its own), and the loop changes it: copy it into a new variable and use the copy", v.Name(), d.fset.Position(lit.Pos()).Line)
			return
		}
		names = append(names, v.Name())
	}
	typ := string(d.src[d.fset.Position(lit.Type.Pos()).Offset:d.fset.Position(lit.Type.End()).Offset])
	if strings.Contains(typ, "\n") {
		d.refuse(lit, "the interpreter shares the loop's variables among the iterations with this function literal (Go gives each iteration its own): write its type on one line, and tally gives it copies")
		return
	}
	from, to := d.fset.Position(lit.Pos()), d.fset.Position(lit.End())
	list := strings.Join(names, ", ")
	d.ins = append(d.ins,
		insertion{off: from.Offset, line: from.Line, col: from.Column, text: "func() " + typ + " { " + list + " := " + list + "; return "},
		insertion{off: to.Offset, line: to.Line, col: to.Column, text: " }()"})
}

// changedInLoop returns a statement in loop that assigns v once lit has captured it, or nil:
// one after lit, or one before it inside an inner loop (around lit) that v is declared outside
// of. The post statement of the three-clause loop that declares v is not one: it acts on the
// next iteration's copy.
func (d *deviations) changedInLoop(v *types.Var, loop ast.Node, lit *ast.FuncLit, loops []ast.Node) ast.Node {
	var at ast.Node
	assigns := func(s ast.Node) {
		if s.Pos() >= lit.End() {
			at = s
			return
		}
		for _, l := range loops {
			if l != loop && l.Pos() <= s.Pos() && s.End() <= l.End() && (v.Pos() < l.Pos() || v.Pos() >= l.End()) {
				at = s
				return
			}
		}
	}
	ast.Inspect(loop, func(n ast.Node) bool {
		if at != nil {
			return false
		}
		if f, ok := n.(*ast.ForStmt); ok && f.Post != nil {
			if init, ok := f.Init.(*ast.AssignStmt); ok && init.Tok == token.DEFINE {
				for _, e := range init.Lhs {
					if id, ok := e.(*ast.Ident); ok && d.info.Defs[id] == v {
						ast.Inspect(f.Body, func(b ast.Node) bool {
							if at == nil && b != nil {
								d.assignsTo(v, b, assigns)
							}
							return at == nil
						})
						return false
					}
				}
			}
		}
		if n != nil {
			d.assignsTo(v, n, assigns)
		}
		return at == nil
	})
	return at
}

// assignsTo calls found with n if n is a statement assigning v.
func (d *deviations) assignsTo(v *types.Var, n ast.Node, found func(ast.Node)) {
	switch s := n.(type) {
	case *ast.AssignStmt:
		for _, e := range s.Lhs {
			if id, ok := ast.Unparen(e).(*ast.Ident); ok && d.info.Uses[id] == v {
				found(s)
				return
			}
		}
	case *ast.IncDecStmt:
		if id, ok := ast.Unparen(s.X).(*ast.Ident); ok && d.info.Uses[id] == v {
			found(s)
		}
	}
}
