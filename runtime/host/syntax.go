package host

import (
	"fmt"
	"go/scanner"
	"go/token"
	"os"
	"regexp"
)

// syntaxMessage words a go/parser syntax error as the Go compiler does ("syntax error:
// unexpected …"), naming the token at the error's position the compiler's way: name x,
// literal 4, keyword else, newline, EOF, or the operator. The forms the compiler words with
// a context of its own that go/parser does not report keep their core ("syntax error:
// unexpected )"); the near-miss scripts check the common ones against go build.
func syntaxMessage(path string, e *scanner.Error) string {
	src, err := os.ReadFile(path)
	if err != nil || e.Pos.Offset < 0 || e.Pos.Offset > len(src) {
		return e.Msg
	}
	tok := tokenAt(src, e.Pos.Offset)
	for _, w := range syntaxWordings {
		if m := w.re.FindStringSubmatch(e.Msg); m != nil {
			return w.word(tok, m)
		}
	}
	return e.Msg
}

var syntaxWordings = []struct {
	re   *regexp.Regexp
	word func(tok string, m []string) string
}{
	{regexp.MustCompile(`^missing ',' (?:before newline )?in (argument list|composite literal)$`), func(tok string, m []string) string {
		closer := ")"
		if m[1] == "composite literal" {
			closer = "}"
		}
		return fmt.Sprintf("syntax error: unexpected %s in %s; possibly missing comma or %s", tok, m[1], closer)
	}},
	{regexp.MustCompile(`^expected operand, found `), func(tok string, m []string) string {
		return fmt.Sprintf("syntax error: unexpected %s, expected expression", tok)
	}},
	{regexp.MustCompile(`^expected '(.+)', found `), func(tok string, m []string) string {
		return fmt.Sprintf("syntax error: unexpected %s, expected %s", tok, m[1])
	}},
	{regexp.MustCompile(`^expected .*, found `), func(tok string, m []string) string {
		return fmt.Sprintf("syntax error: unexpected %s", tok)
	}},
}

// tokenAt describes the token starting at offset the compiler's way.
func tokenAt(src []byte, offset int) string {
	fset := token.NewFileSet()
	file := fset.AddFile("", -1, len(src))
	var s scanner.Scanner
	s.Init(file, src, nil, 0)
	for {
		pos, tok, lit := s.Scan()
		off := file.Offset(pos)
		if off < offset && tok != token.EOF {
			continue
		}
		switch {
		case tok == token.EOF:
			return "EOF"
		case tok == token.SEMICOLON && lit == "\n":
			return "newline"
		case tok == token.IDENT:
			return "name " + lit
		case tok.IsLiteral():
			return "literal " + lit
		case tok.IsKeyword():
			return "keyword " + tok.String()
		}
		return tok.String()
	}
}
