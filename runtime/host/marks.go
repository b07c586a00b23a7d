package host

import (
	"fmt"
	"go/ast"
	"go/token"
	"reflect"
	"sort"
	"strconv"
	"sync/atomic"

	"github.com/traefik/yaegi/interp"
)

// The interpreter reports a panic only at the enclosing function, so the host marks the script:
// before every statement that is not inside a loop it inserts a call that records the
// statement's position. A mistake found by a compiled block or by sim, or a panic in script
// code, is then reported at the last statement the script reached. Loop bodies stay unmarked so
// a script's own per-sample code pays nothing; an error there is reported at the loop.
//
// Markers go on the same line as their statement and the import on the package line, so the
// instrumented text keeps every line number.

const markPkg = "tally/internal/mark"

type marks struct {
	pos  []token.Position
	ins  []insertion  // what was inserted, by offset
	last atomic.Int64 // 1 + index of the last marker reached; 0 before any
	prep *prepared    // the type-checked script (nil: not checked)
}

// where is the position of the last marker reached, "" before any.
func (m *marks) where() string {
	i := m.last.Load()
	if i == 0 {
		return ""
	}
	p := m.pos[i-1]
	return fmt.Sprintf("%s:%d:%d", p.Filename, p.Line, p.Column)
}

func (m *marks) exports() interp.Exports {
	return interp.Exports{markPkg + "/mark": {"At": reflect.ValueOf(func(i int) { m.last.Store(int64(i)) })}}
}

// instrument returns src with markers and the fixes inserted, and the marker table.
func instrument(fset *token.FileSet, f *ast.File, src []byte, fixes ...insertion) ([]byte, *marks) {
	m := &marks{}
	var offsets []int
	var list func(stmts []ast.Stmt, inLoop bool)
	var visit func(n ast.Node, inLoop bool)
	list = func(stmts []ast.Stmt, inLoop bool) {
		for _, s := range stmts {
			_, isCase := s.(*ast.CaseClause)
			_, isComm := s.(*ast.CommClause)
			if !inLoop && !isCase && !isComm {
				p := fset.Position(s.Pos())
				m.pos = append(m.pos, p)
				offsets = append(offsets, p.Offset)
			}
			visit(s, inLoop)
		}
	}
	visit = func(n ast.Node, inLoop bool) {
		ast.Inspect(n, func(c ast.Node) bool {
			if c == n {
				switch s := c.(type) {
				case *ast.BlockStmt:
					list(s.List, inLoop)
					return false
				case *ast.CaseClause:
					list(s.Body, inLoop)
					return false
				case *ast.CommClause:
					list(s.Body, inLoop)
					return false
				}
				return true
			}
			switch s := c.(type) {
			case *ast.FuncLit:
				visit(s.Body, false)
				return false
			case *ast.ForStmt:
				visit(s.Body, true)
				return false
			case *ast.RangeStmt:
				visit(s.Body, true)
				return false
			case *ast.BlockStmt, *ast.CaseClause, *ast.CommClause:
				visit(s, inLoop)
				return false
			}
			return true
		})
	}
	for _, d := range f.Decls {
		if fd, ok := d.(*ast.FuncDecl); ok && fd.Body != nil {
			visit(fd.Body, false)
		}
	}
	if len(offsets) == 0 && len(fixes) == 0 {
		return src, m
	}
	edits := append([]insertion(nil), fixes...)
	end := fset.Position(f.Name.End())
	edits = append(edits, insertion{off: end.Offset, line: end.Line, col: end.Column, text: "; import __tallymark " + strconv.Quote(markPkg)})
	for i, off := range offsets {
		p := m.pos[i]
		edits = append(edits, insertion{off: off, line: p.Line, col: p.Column, text: fmt.Sprintf("__tallymark.At(%d); ", i+1)})
	}
	sort.SliceStable(edits, func(a, b int) bool { return edits[a].off < edits[b].off })
	out := make([]byte, 0, len(src)+len(edits)*24)
	prev := 0
	for _, e := range edits {
		out = append(out, src[prev:e.off]...)
		out = append(out, e.text...)
		prev = e.off + e.del
	}
	out = append(out, src[prev:]...)
	m.ins = edits
	return out, m
}

type insertion struct {
	off, line, col int // where, in the original text
	text           string
	del            int // bytes of the original text the insertion replaces (on its line)
}

// column maps a column of the instrumented text back to the original on the same line.
func (m *marks) column(line, col int) int {
	shift := 0
	for _, e := range m.ins {
		if e.line == line && e.col+shift+len(e.text) <= col {
			shift += len(e.text) - e.del
		}
	}
	return col - shift
}
