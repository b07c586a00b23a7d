package compile

import (
	"bufio"
	"bytes"
	"crypto/sha256"
	"fmt"
	"io/fs"
	"os"
	"path"
	"path/filepath"
	"runtime"
	"slices"
	"strings"
)

// ModulePath is tally's module path.
const ModulePath = "tally"

// module is where a build takes tally's source from.
type module struct {
	dir  string // the module's root (the build's main module)
	hash string // of its sources, for the cache key
	from string // "checkout" or "snapshot"
}

// moduleFor is tally's source for a script: the checkout this tally was built from, if the
// script sits in it and its sources are still those this tally carries (sameAsSnapshot; with
// edits since, no build: Unavailable), else the embedded snapshot, unpacked into the cache once. Another checkout, of another version
// perhaps, is not used: the compiled script must run the blocks the interpreter ran.
func moduleFor(script, cache string) (*module, error) {
	if root := checkoutOf(script); root != "" && root == builtFrom() {
		if !sameAsSnapshot(root) {
			// The interpreter runs the blocks as this tally was built; the checkout's edited
			// ones would compute the rest of the run with other code.
			return nil, &Unavailable{Why: "tally's sources in this checkout changed since this tally was built, and a run must use one version of the blocks (go install ./cmd/tally builds it anew)"}
		}
		h, err := hashTree(root)
		if err == nil {
			return &module{dir: root, hash: "checkout " + h, from: "checkout"}, nil
		}
	}
	dir, h, err := unpackSnapshot(cache)
	if err != nil {
		return nil, err
	}
	return &module{dir: dir, hash: "snapshot " + h, from: "snapshot"}, nil
}

// ModuleDir is the folder a build of the script takes tally's source from (see moduleFor):
// where `go build` of the script by hand would be run, as tally bench does for its reference.
func ModuleDir(script, cache string) (string, error) {
	if cache == "" {
		cache = DefaultCache()
	}
	m, err := moduleFor(script, cache)
	if err != nil {
		return "", err
	}
	return m.dir, nil
}

// builtFrom is the root of the checkout this binary was built from, "" when it is unknown (a
// build with -trimpath records no paths).
func builtFrom() string {
	_, file, _, ok := runtime.Caller(0)
	if !ok || !filepath.IsAbs(file) {
		return ""
	}
	dir := filepath.Dir(file)
	if filepath.Base(dir) != "compile" || filepath.Base(filepath.Dir(dir)) != "runtime" {
		return ""
	}
	return filepath.Dir(filepath.Dir(dir))
}

// checkoutOf is the root of the module tally whose folder holds the script, or "": the
// nearest go.mod above the script decides.
func checkoutOf(script string) string {
	abs, err := filepath.Abs(script)
	if err != nil {
		return ""
	}
	for dir := filepath.Dir(abs); ; {
		if b, err := os.ReadFile(filepath.Join(dir, "go.mod")); err == nil {
			if modulePath(b) == ModulePath {
				return dir
			}
			return ""
		}
		up := filepath.Dir(dir)
		if up == dir {
			return ""
		}
		dir = up
	}
}

// modulePath is the path a go.mod declares.
func modulePath(gomod []byte) string {
	sc := bufio.NewScanner(bytes.NewReader(gomod))
	for sc.Scan() {
		f := strings.Fields(sc.Text())
		if len(f) >= 2 && f[0] == "module" {
			return strings.Trim(f[1], `"`)
		}
	}
	return ""
}

// sourceDirs are the top folders of the module whose packages a script can reach.
var sourceDirs = []string{"blocks", "runtime", "plots"}

// hashTree hashes what a build of a script takes from a checkout: go.mod, go.sum and every
// Go file (not tests, not testdata) below the source folders.
func hashTree(root string) (string, error) {
	files, err := treeFiles(root)
	if err != nil {
		return "", err
	}
	h := sha256.New()
	for _, f := range files {
		b, err := os.ReadFile(filepath.Join(root, f))
		if err != nil {
			return "", err
		}
		fmt.Fprintf(h, "%s %x\n", f, sha256.Sum256(b))
	}
	return fmt.Sprintf("%x", h.Sum(nil)), nil
}

// treeFiles lists, slash-separated and sorted, go.mod, go.sum and the Go files below the
// source folders of a checkout.
func treeFiles(root string) ([]string, error) {
	files := []string{"go.mod", "go.sum"}
	for _, top := range sourceDirs {
		err := filepath.WalkDir(filepath.Join(root, top), func(p string, d fs.DirEntry, err error) error {
			if err != nil {
				return err
			}
			name := d.Name()
			if d.IsDir() {
				if name == "testdata" || strings.HasPrefix(name, ".") || strings.HasPrefix(name, "_") {
					return filepath.SkipDir
				}
				return nil
			}
			if strings.HasSuffix(name, ".go") && !strings.HasSuffix(name, "_test.go") {
				rel, _ := filepath.Rel(root, p)
				files = append(files, filepath.ToSlash(rel))
			}
			return nil
		})
		if err != nil && !os.IsNotExist(err) {
			return nil, err
		}
	}
	slices.Sort(files[2:])
	return files, nil
}

// sameAsSnapshot reports whether the checkout at root holds the sources of the embedded
// snapshot, to the byte: every file of the snapshot, and no other Go file (tests aside) in
// its packages' folders.
func sameAsSnapshot(root string) bool {
	files, err := readSnapshot(snapshot)
	if err != nil {
		return false
	}
	dirs := map[string]bool{}
	for name, b := range files {
		got, err := os.ReadFile(filepath.Join(root, filepath.FromSlash(name)))
		if err != nil || !bytes.Equal(got, b) {
			return false
		}
		if strings.HasSuffix(name, ".go") {
			dirs[path.Dir(name)] = true
		}
	}
	for d := range dirs {
		entries, err := os.ReadDir(filepath.Join(root, filepath.FromSlash(d)))
		if err != nil {
			return false
		}
		for _, e := range entries {
			n := e.Name()
			if !e.IsDir() && strings.HasSuffix(n, ".go") && !strings.HasSuffix(n, "_test.go") && files[d+"/"+n] == nil {
				return false
			}
		}
	}
	return true
}
