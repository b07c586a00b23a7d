package host

import (
	"context"
	"errors"
	"os"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// A mistake in a custom block run by the interpreter reads as Go's own panic would (the Go
// specification, "Run-time panics", and the runtime's messages: "index out of range",
// "slice bounds out of range", "assignment to entry in nil map", "invalid memory address or
// nil pointer dereference"; from memory), at the script's line, naming the point and frame
// by the script's own numbering (p.Index and f.Index, from 0) — never reflect's words.
func TestBlockPanicsInGoWords(t *testing.T) {
	p := scriptIn(t, "custom.go")
	good, _ := os.ReadFile(p)
	for _, c := range []struct {
		name, from, to string
		line           int // the script line reported
		msg            string
	}{
		{"index", "hard[i] = 1", "hard[i+len(hard)] = 1", 35, "index out of range: an index below 0 or not below the slice's length"},
		{"array index", "f.Hard = hard", "var arr [4]int\n\t\t\t_ = arr[len(hard)-1020]\n\t\t\tf.Hard = hard", 41, "index out of range: an index below 0 or not below the array's length"},
		{"slice", "f.Hard = hard", "f.Hard = hard[:2*cap(hard)]", 40, "slice bounds out of range: a bound below 0, above the capacity"},
		{"nil map", "f.Hard = hard", "var m map[int]int\n\t\t\tm[1] = 2\n\t\t\tf.Hard = hard", 41, "assignment to entry in nil map"},
		{"nil pointer", "f.Hard = hard", "var q *link.Frame\n\t\t\tq.Hard = hard\n\t\t\tf.Hard = hard", 41, "invalid memory address or nil pointer dereference"},
		{"divide", "f.Hard = hard", "z := len(hard) - 1024\n\t\t\t_ = 1 / z\n\t\t\tf.Hard = hard", 41, "runtime error: integer divide by zero"},
	} {
		t.Run(c.name, func(t *testing.T) {
			src := strings.Replace(string(good), c.from, c.to, 1)
			if src == string(good) {
				t.Fatal("the case does not change the script")
			}
			os.WriteFile(p, []byte(src), 0o644)
			err := Run(context.Background(), p, quiet(1))
			var se *ScriptError
			if !errors.As(err, &se) {
				t.Fatalf("want a ScriptError, got %v", err)
			}
			if want := regexp.MustCompile(`:` + itoa(c.line) + `:\d+$`); !strings.HasPrefix(se.Pos, p+":") || !want.MatchString(se.Pos) {
				t.Errorf("position %q, want line %d of %s", se.Pos, c.line, p)
			}
			if want := "point 0 (ebn0_db=0), frame 0: panic: " + c.msg; !strings.HasPrefix(se.Msg, want) {
				t.Errorf("message %q, want it to start %q", se.Msg, want)
			}
			if strings.Contains(se.Msg, "reflect") {
				t.Errorf("message %q shows the interpreter's words", se.Msg)
			}
		})
	}
}

func itoa(n int) string { return strconv.Itoa(n) }

// The interpreter's reflect wording, each in Go's words; other panics pass as they are.
func TestGoMessage(t *testing.T) {
	for _, c := range []struct {
		in, want  string
		line, col int
	}{
		{"reflect: slice index out of range", "index out of range: an index below 0 or not below the slice's length (go run of the script shows the index and length)", 0, 0},
		{"reflect: string index out of range", "index out of range: an index below 0 or not below the string's length (go run of the script shows the index and length)", 0, 0},
		{"reflect.Value.Slice3: slice index out of bounds", "slice bounds out of range: a bound below 0, above the capacity, or a low bound above the high one (go run of the script shows the bounds)", 0, 0},
		{"reflect: call of reflect.Value.Elem on zero Value", "invalid memory address or nil pointer dereference", 0, 0},
		{"x.go:41:28: interface conversion: interface {} is int, not string", "interface conversion: interface {} is int, not string", 41, 28},
		{"reflect.Set: value of type string is not assignable to type int", "value of type string is not assignable to type int", 0, 0},
		{"boom", "boom", 0, 0},
	} {
		msg, line, col := goMessage(c.in)
		if msg != c.want || line != c.line || col != c.col {
			t.Errorf("%q: %q at %d:%d, want %q at %d:%d", c.in, msg, line, col, c.want, c.line, c.col)
		}
	}
	var s []int
	func() {
		defer func() {
			msg, _, _ := goMessage(recover())
			if want := "runtime error: index out of range [3] with length 0"; msg != want {
				t.Errorf("a runtime error: %q, want Go's own %q", msg, want)
			}
		}()
		_ = s[len(s)+3]
	}()
}

// With several workers the others go on through the script while one frame fails; the line
// reported is still the failing statement's (the engine runs the failed frame once more,
// alone, for its position).
func TestBlockPanicLineWithWorkers(t *testing.T) {
	p := scriptIn(t, "custom.go")
	good, _ := os.ReadFile(p)
	os.WriteFile(p, []byte(strings.Replace(string(good), "f.Hard = hard", `panic("the slicer gave up")`, 1)), 0o644)
	for range 5 {
		err := Run(context.Background(), p, quiet(4))
		var se *ScriptError
		if !errors.As(err, &se) {
			t.Fatalf("want a ScriptError, got %v", err)
		}
		if want := p + ":40:4"; se.Pos != want || se.Msg != "point 0 (ebn0_db=0), frame 0: panic: the slicer gave up" {
			t.Errorf("%s: %s; want %s: point 0 (ebn0_db=0), frame 0: panic: the slicer gave up", se.Pos, se.Msg, want)
		}
	}
}
