package host

import (
	"errors"
	"fmt"
	"regexp"
	"runtime"
	"strconv"
	"strings"

	"tally/runtime/engine"
)

// A panic in script code run by the interpreter carries the interpreter's words: it indexes,
// slices and dereferences through package reflect, whose panics name reflect and not the
// values (reflect: slice index out of range). goWords puts them in Go's own words, as a
// compiled run of the script would print them, less the values the interpreter does not
// report; where the values are lost the message says so and how to see them.
var goWords = []struct {
	re   *regexp.Regexp
	with string
}{
	{regexp.MustCompile(`^reflect: (slice|array|string) index out of range$`),
		"index out of range: an index below 0 or not below the ${1}'s length (go run of the script shows the index and length)"},
	{regexp.MustCompile(`^reflect\.Value\.Slice3?: (string )?slice index out of bounds$`),
		"slice bounds out of range: a bound below 0, above the capacity, or a low bound above the high one (go run of the script shows the bounds)"},
	{regexp.MustCompile(`^reflect: call of reflect\.Value\.\w+ on zero Value$`),
		"invalid memory address or nil pointer dereference"},
	{regexp.MustCompile(`^reflect: (?:call of )?reflect\.Value\.\w+ (?:on|using) (?:nil|zero) .*$`),
		"invalid memory address or nil pointer dereference"},
	{regexp.MustCompile(`^reflect(?:\.[\w.]+)?: (.*)$`), "$1"},
}

// innerPos is a script position the interpreter put in front of a panic's message
// ("name.go:41:28: interface conversion: …").
var innerPos = regexp.MustCompile(`^(?:.*?):(\d+):(\d+): (.*)$`)

// goMessage is the panic value v in Go's words, and the line and column the interpreter gave
// with it (0 when none).
func goMessage(v any) (msg string, line, col int) {
	var re runtime.Error
	if e, ok := v.(error); ok && errors.As(e, &re) {
		return re.Error(), 0, 0 // Go's own words already
	}
	msg = fmt.Sprint(v)
	if m := innerPos.FindStringSubmatch(msg); m != nil {
		line, _ = strconv.Atoi(m[1])
		col, _ = strconv.Atoi(m[2])
		msg = m[3]
	}
	for _, w := range goWords {
		if w.re.MatchString(msg) {
			return w.re.ReplaceAllString(msg, w.with), line, col
		}
	}
	return msg, line, col
}

// inGoWords is err's message with a block's panic inside it (engine.PanicError) in Go's words,
// and the line and column the interpreter gave with the panic (0 when none).
func inGoWords(err error) (msg string, line, col int) {
	var pe *engine.PanicError
	if !errors.As(err, &pe) {
		return err.Error(), 0, 0
	}
	was := pe.Error()
	words, line, col := goMessage(pe.Value)
	pe.Value = words
	// The wrapping errors hold their text already: swap the panic's in it.
	return strings.Replace(err.Error(), was, pe.Error(), 1), line, col
}

// scriptPosAt is pos ("file:line:col") with the column the interpreter gave, when it gave one
// for the same line: a statement's start is where the markers point, the interpreter's column
// is the expression that failed.
func scriptPosAt(pos string, line, col int) string {
	if line == 0 {
		return pos
	}
	i := strings.LastIndexByte(pos, ':')
	j := strings.LastIndexByte(pos[:max(i, 0)], ':')
	if i < 0 || j < 0 || pos[j+1:i] != strconv.Itoa(line) {
		return pos
	}
	return pos[:i+1] + strconv.Itoa(col)
}
