//go:build ignore

// exportgen writes exportdata.bin: the type information (export data) of every package a
// script can import, so that tally type-checks a script as the Go compiler would, with no Go
// toolchain or sources at run time. The packages are tally's script-facing ones, read from the
// yaegi extract line in symbols.go (one list for both), and every standard package the
// interpreter carries (a -trust script may import any of them).
//
// Run by go generate in this folder; TestExportDataFresh fails when the file is stale.
//
// Usage: go run exportgen.go [-o exportdata.bin]
package main

import (
	"bytes"
	"compress/gzip"
	"flag"
	"fmt"
	"go/token"
	"go/types"
	"log"
	"os"
	"os/exec"
	"regexp"
	"runtime"
	"sort"
	"strings"

	"github.com/traefik/yaegi/stdlib"
	"golang.org/x/tools/go/gcexportdata"
)

// The platform the data is made for: fixed, so that the file is the same bytes on every
// developer's machine. The packages a sandboxed script may import have the same API on every
// 64-bit platform; the host checks other platforms' -trust scripts only when they import no
// platform-specific package.
const goos, goarch = "linux", "amd64"

func main() {
	out := flag.String("o", "exportdata.bin", "output file")
	flag.Parse()
	b, err := generate()
	if err != nil {
		log.Fatal(err)
	}
	var packed bytes.Buffer
	z, _ := gzip.NewWriterLevel(&packed, gzip.BestCompression)
	if _, err := z.Write(b); err != nil {
		log.Fatal(err)
	}
	if err := z.Close(); err != nil {
		log.Fatal(err)
	}
	if err := os.WriteFile(*out, packed.Bytes(), 0o644); err != nil {
		log.Fatal(err)
	}
}

// tallyPackages reads the script-facing packages from symbols.go's go:generate line.
func tallyPackages() ([]string, error) {
	src, err := os.ReadFile("symbols.go")
	if err != nil {
		return nil, err
	}
	m := regexp.MustCompile(`(?m)^//go:generate go tool yaegi extract -name symbols (.*)$`).FindSubmatch(src)
	if m == nil {
		return nil, fmt.Errorf("no yaegi extract line in symbols.go")
	}
	return strings.Fields(string(m[1])), nil
}

func generate() ([]byte, error) {
	pkgs, err := tallyPackages()
	if err != nil {
		return nil, err
	}
	seen := map[string]bool{}
	for _, p := range pkgs {
		seen[p] = true
	}
	for k := range stdlib.Symbols {
		i := strings.LastIndex(k, "/")
		if i < 0 {
			continue // yaegi's own entries
		}
		if p := k[:i]; !seen[p] {
			seen[p] = true
			pkgs = append(pkgs, p)
		}
	}
	sort.Strings(pkgs)

	// The compiler's export data of each package, from the build cache.
	args := append([]string{"list", "-export", "-f", "{{.ImportPath}}\t{{.Export}}"}, pkgs...)
	cmd := exec.Command("go", args...)
	cmd.Env = append(os.Environ(), "GOOS="+goos, "GOARCH="+goarch)
	cmd.Stderr = os.Stderr
	listing, err := cmd.Output()
	if err != nil {
		return nil, fmt.Errorf("go list: %v", err)
	}
	files := map[string]string{}
	for _, line := range strings.Split(strings.TrimSpace(string(listing)), "\n") {
		path, file, _ := strings.Cut(line, "\t")
		files[path] = file
	}

	var buf bytes.Buffer
	fmt.Fprintf(&buf, "tally export data\n%s %s/%s\n", goVersion(), goos, goarch)
	for _, p := range pkgs {
		if files[p] == "" {
			return nil, fmt.Errorf("no export data for %s", p)
		}
		pkg, err := read(p, files[p])
		if err != nil {
			return nil, err
		}
		// Without a file set no positions are written: the data holds no file names, and
		// the compiler's messages about a script never show positions inside a package.
		var data bytes.Buffer
		if err := gcexportdata.Write(&data, nil, pkg); err != nil {
			return nil, fmt.Errorf("%s: %v", p, err)
		}
		fmt.Fprintf(&buf, "%s %d\n", p, data.Len())
		buf.Write(data.Bytes())
	}
	return buf.Bytes(), nil
}

// read loads one package from the compiler's export data, in its own universe so that the
// data written for it holds everything it refers to.
func read(path, file string) (*types.Package, error) {
	f, err := os.Open(file)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	r, err := gcexportdata.NewReader(f)
	if err != nil {
		return nil, fmt.Errorf("%s: %v", path, err)
	}
	return gcexportdata.Read(r, token.NewFileSet(), map[string]*types.Package{}, path)
}

// goVersion is the language version of the toolchain (go1.26): the standard packages' API
// changes only with it.
func goVersion() string {
	v := runtime.Version()
	if i := strings.Index(v, "."); i >= 0 {
		if j := strings.IndexAny(v[i+1:], ".-+ "); j >= 0 {
			v = v[:i+1+j]
		}
	}
	return v
}
