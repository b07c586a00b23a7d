package host

import (
	"bytes"
	"context"
	"errors"
	"go/parser"
	"go/token"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"github.com/traefik/yaegi/stdlib"

	"tally/runtime/host/symbols"
)

// A near-miss script (testdata/nearmiss; .go.txt for those with syntax errors) is one where go run and tally run used to differ. Its
// comment says what each way does:
//
//	// compiler: LINE:COL: MESSAGE     the Go compiler refuses it so; tally must say the same
//	// prints: TEXT                     go run prints TEXT, and so must tally unless …
//	// interpreter: LINE:COL: WORDS     … tally refuses it there, with a message holding WORDS
//
// The compiler lines were recorded from go build (go1.26); TestNearMissCompiled checks them,
// and the prints lines, against the real toolchain where one is installed.
type nearMiss struct {
	name        string
	src         []byte
	compiler    string // LINE:COL: MESSAGE
	prints      string
	interpreter string // LINE:COL: WORDS
}

var annotation = regexp.MustCompile(`(?m)^// (compiler|prints|interpreter): (.*)$`)

func nearMisses(t testing.TB) []nearMiss {
	t.Helper()
	files, err := filepath.Glob(filepath.Join("testdata", "nearmiss", "*.go"))
	if err != nil || len(files) == 0 {
		t.Fatalf("no near-miss scripts: %v", err)
	}
	// Scripts with syntax errors are kept as .go.txt, so that gofmt passes over them.
	broken, _ := filepath.Glob(filepath.Join("testdata", "nearmiss", "*.go.txt"))
	files = append(files, broken...)
	var out []nearMiss
	for _, f := range files {
		src, err := os.ReadFile(f)
		if err != nil {
			t.Fatal(err)
		}
		nm := nearMiss{name: strings.TrimSuffix(filepath.Base(f), ".txt"), src: src}
		for _, m := range annotation.FindAllSubmatch(src, -1) {
			switch string(m[1]) {
			case "compiler":
				nm.compiler = string(m[2])
			case "prints":
				nm.prints = string(m[2])
			case "interpreter":
				nm.interpreter = string(m[2])
			}
		}
		if (nm.compiler == "") == (nm.prints == "") {
			t.Fatalf("%s: want either a compiler or a prints line", f)
		}
		out = append(out, nm)
	}
	return out
}

func (nm nearMiss) write(t *testing.T) string {
	t.Helper()
	p := filepath.Join(t.TempDir(), nm.name)
	if err := os.WriteFile(p, nm.src, 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// tally run refuses what the compiler refuses, at its position with its message; runs what it
// accepts with the output Go gives; and refuses, at the line, what the interpreter would run
// otherwise than Go.
func TestNearMissInterpreted(t *testing.T) {
	for _, nm := range nearMisses(t) {
		t.Run(nm.name, func(t *testing.T) {
			p := nm.write(t)
			var out bytes.Buffer
			cfg := quiet(1)
			cfg.Stdout = &out
			err := Run(context.Background(), p, cfg)
			var se *ScriptError
			switch {
			case nm.compiler != "":
				if !errors.As(err, &se) || se.Error() != p+":"+nm.compiler {
					t.Fatalf("got  %v\nwant %s:%s", err, p, nm.compiler)
				}
			case nm.interpreter != "":
				at, words, _ := strings.Cut(nm.interpreter, ": ")
				if !errors.As(err, &se) || se.Pos != p+":"+at || !strings.Contains(se.Msg, words) {
					t.Fatalf("got  %v\nwant %s:%s: …%s…", err, p, at, words)
				}
				if out.Len() > 0 {
					t.Errorf("a refused script printed %q", out.String())
				}
			default:
				if err != nil {
					t.Fatal(err)
				}
				if got := strings.TrimSuffix(out.String(), "\n"); got != nm.prints {
					t.Errorf("printed %q, Go prints %q", got, nm.prints)
				}
				table(t, p)
			}
		})
	}
}

// The recorded verdicts hold for the real toolchain: go build refuses the compiler cases with
// the recorded first line, and go run runs the others printing the recorded text, with the
// same table as tally run.
func TestNearMissCompiled(t *testing.T) {
	if testing.Short() {
		t.Skip("builds each near-miss script with the go command")
	}
	if _, err := exec.LookPath("go"); err != nil {
		t.Skip("no Go toolchain installed: the compiler's verdicts are not re-checked")
	}
	root, _ := filepath.Abs(filepath.Join("..", ".."))
	for _, nm := range nearMisses(t) {
		t.Run(nm.name, func(t *testing.T) {
			p := nm.write(t)
			if nm.compiler != "" {
				cmd := exec.Command("go", "build", "-o", os.DevNull, p)
				cmd.Dir = root
				out, err := cmd.CombinedOutput()
				if err == nil {
					t.Fatal("go build accepted the script")
				}
				// go build names the file by whichever path is shorter, absolute or relative to
				// its folder, so compare from the file's base name on.
				base := filepath.Base(p) + ":"
				var first string
				for _, l := range strings.Split(string(out), "\n") {
					if i := strings.Index(l, base); i >= 0 && !strings.HasPrefix(l, "#") {
						first = l[i:]
						break
					}
				}
				if first != base+nm.compiler {
					t.Fatalf("go build says\n%s\nrecorded %s", out, nm.compiler)
				}
				return
			}
			var want []byte
			if nm.interpreter == "" {
				cfg := quiet(1)
				cfg.Stdout = io.Discard
				if err := Run(context.Background(), p, cfg); err != nil {
					t.Fatal(err)
				}
				want = table(t, p)
			}
			cmd := exec.Command("go", "run", p, "-quiet", "-workers", "2")
			cmd.Dir = root
			var stdout, stderr bytes.Buffer
			cmd.Stdout, cmd.Stderr = &stdout, &stderr
			if err := cmd.Run(); err != nil {
				t.Fatalf("go run: %v\n%s", err, stderr.Bytes())
			}
			if got := strings.TrimSuffix(stdout.String(), "\n"); got != nm.prints {
				t.Errorf("go run printed %q, recorded %q", got, nm.prints)
			}
			if want != nil && !bytes.Equal(table(t, p), want) {
				t.Errorf("compiled table differs from interpreted\n%s\nvs\n%s", table(t, p), want)
			}
		})
	}
}

// Every script the project ships passes the type check and the interpreter checks unchanged:
// they keep running as before.
func TestShippedScriptsPass(t *testing.T) {
	files, _ := filepath.Glob(filepath.Join("..", "..", "experiments", "*.go"))
	more, _ := filepath.Glob(filepath.Join("testdata", "*.go"))
	files = append(files, more...)
	if len(files) < 5 {
		t.Fatalf("found only %d scripts", len(files))
	}
	for _, f := range files {
		src, err := os.ReadFile(f)
		if err != nil {
			t.Fatal(err)
		}
		fset := token.NewFileSet()
		file, err := parser.ParseFile(fset, f, src, 0)
		if err != nil {
			t.Fatal(err)
		}
		p, err := prepare(fset, file, f, src)
		if err != nil {
			t.Errorf("%s: %v", f, err)
			continue
		}
		if !bytes.Equal(p.src, src) || len(p.fixes) > 0 {
			t.Errorf("%s: changed for the interpreter", f)
		}
	}
}

// A three-clause loop whose variable a function literal keeps and whose body changes it has no
// exact per-iteration copy: it is refused at the change, which Go 1.22 runs otherwise than the
// interpreter.
func TestRefusesChangedCapturedLoopVariable(t *testing.T) {
	p := filepath.Join(t.TempDir(), "a.go")
	src := "//go:build ignore\n\npackage main\n\nimport \"fmt\"\n\nfunc main() {\n\tvar fs []func() int\n\tfor i := 0; i < 6; i++ {\n\t\tfs = append(fs, func() int { return i })\n\t\ti++\n\t}\n\tfmt.Println(fs[0](), fs[1]())\n}\n"
	os.WriteFile(p, []byte(src), 0o644)
	err := Run(context.Background(), p, quiet(1))
	var se *ScriptError
	if !errors.As(err, &se) || se.Pos != p+":11:3" || !strings.Contains(se.Msg, "shares one i") {
		t.Fatalf("got %v", err)
	}
}

// The type check is part of every run's start: it must stay far below the ~100 ms budget for
// the first progress line. This measures it on the largest shipped experiment, importer and all
// (the embedded data is parsed once per process, measured apart).
func BenchmarkPrepare(b *testing.B) {
	f := filepath.Join("..", "..", "experiments", "telemetry.go")
	src, err := os.ReadFile(f)
	if err != nil {
		b.Fatal(err)
	}
	for b.Loop() {
		fset := token.NewFileSet()
		file, err := parser.ParseFile(fset, f, src, 0)
		if err != nil {
			b.Fatal(err)
		}
		if _, err := prepare(fset, file, f, src); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkParseExportData(b *testing.B) {
	for b.Loop() {
		if _, err := parseExportData(symbols.ExportData()); err != nil {
			b.Fatal(err)
		}
	}
}

// The embedded data serves every package a script may import: tally's script-facing ones and
// the sandbox's standard ones, and with -trust every standard package the interpreter carries.
func TestExportDataServesScriptPackages(t *testing.T) {
	d, err := exports()
	if err != nil {
		t.Fatal(err)
	}
	want := append(tallyPackages(), Safe...)
	for k := range stdlib.Symbols {
		if i := strings.LastIndex(k, "/"); i > 0 {
			want = append(want, k[:i])
		}
	}
	for _, p := range want {
		if _, ok := d.pkgs[p]; !ok {
			t.Errorf("no export data for %s", p)
		}
	}
}
