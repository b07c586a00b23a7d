package host

import (
	"fmt"
	"go/ast"
	"go/token"
)

// checkLimits refuses constructs the interpreter is known to run wrongly, rather than let a
// script compute a wrong result. yaegi v0.16 drops the constant values of a multiple assignment
// with "=" that mixes constants and other expressions (a, b = 1, len(s) leaves a unchanged);
// ":=" and all-constant or all-expression assignments are right.
func checkLimits(fset *token.FileSet, f *ast.File, path string) error {
	var bad ast.Node
	ast.Inspect(f, func(n ast.Node) bool {
		if bad != nil {
			return false
		}
		a, ok := n.(*ast.AssignStmt)
		if !ok || a.Tok != token.ASSIGN || len(a.Lhs) < 2 || len(a.Rhs) != len(a.Lhs) {
			return true
		}
		consts := 0
		for _, e := range a.Rhs {
			if constant(e) {
				consts++
			}
		}
		if consts > 0 && consts < len(a.Rhs) {
			bad = a
		}
		return true
	})
	if bad == nil {
		return nil
	}
	p := fset.Position(bad.Pos())
	return &ScriptError{Pos: fmt.Sprintf("%s:%d:%d", path, p.Line, p.Column),
		Msg: "the interpreter mis-runs a multiple assignment that mixes constants and other values; write one assignment per statement"}
}

func constant(e ast.Expr) bool {
	switch v := e.(type) {
	case *ast.BasicLit:
		return true
	case *ast.Ident:
		return v.Name == "true" || v.Name == "false" || v.Name == "nil"
	case *ast.UnaryExpr:
		return constant(v.X)
	case *ast.ParenExpr:
		return constant(v.X)
	case *ast.BinaryExpr:
		return constant(v.X) && constant(v.Y)
	}
	return false
}
