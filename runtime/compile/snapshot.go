package compile

import (
	"archive/zip"
	"bytes"
	"crypto/sha256"
	_ "embed"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path"
	"path/filepath"
	"slices"
	"strings"
	"sync"
	"time"
)

//go:generate go run snapgen.go

// snapshot is module tally's source as a script's build needs it: go.mod, go.sum and the Go
// files (no tests) of every package a script can reach, zip-compressed. `go generate
// ./runtime/compile` writes it (snapgen.go); TestSnapshotFresh fails when it is stale.
//
//go:embed snapshot.zip
var snapshot []byte

var snapshotHash = sync.OnceValue(func() string { return fmt.Sprintf("%x", sha256.Sum256(snapshot)) })

// unpackSnapshot unpacks the snapshot into the cache once; it returns the module's folder and
// the snapshot's hash.
func unpackSnapshot(cache string) (dir, hash string, err error) {
	if len(snapshot) == 0 {
		return "", "", &Unavailable{Why: "this tally carries no copy of its module's sources, and the script is not in a checkout of module tally"}
	}
	hash = snapshotHash()
	dir = filepath.Join(cache, "src", hash[:24])
	if _, err := os.Stat(filepath.Join(dir, "go.mod")); err == nil {
		return dir, hash, nil
	}
	fail := func(err error) (string, string, error) {
		return "", "", &Unavailable{Why: fmt.Sprintf("cannot unpack tally's sources into the cache %s: %v", cache, err)}
	}
	if err := os.MkdirAll(filepath.Dir(dir), 0o755); err != nil {
		return fail(err)
	}
	tmp, err := os.MkdirTemp(filepath.Dir(dir), ".unpack-")
	if err != nil {
		return fail(err)
	}
	defer os.RemoveAll(tmp)
	files, err := readSnapshot(snapshot)
	if err != nil {
		return fail(err)
	}
	for name, b := range files {
		p := filepath.Join(tmp, filepath.FromSlash(name))
		if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
			return fail(err)
		}
		if err := os.WriteFile(p, b, 0o444); err != nil {
			return fail(err)
		}
	}
	if err := os.Rename(tmp, dir); err != nil {
		if _, serr := os.Stat(filepath.Join(dir, "go.mod")); serr == nil {
			return dir, hash, nil // another run unpacked it meanwhile
		}
		return fail(err)
	}
	return dir, hash, nil
}

// readSnapshot unpacks a snapshot's files (slash-separated names).
func readSnapshot(b []byte) (map[string][]byte, error) {
	zr, err := zip.NewReader(bytes.NewReader(b), int64(len(b)))
	if err != nil {
		return nil, err
	}
	files := map[string][]byte{}
	for _, f := range zr.File {
		name := path.Clean(f.Name)
		if strings.HasPrefix(name, "../") || path.IsAbs(name) {
			return nil, fmt.Errorf("snapshot: bad name %q", f.Name)
		}
		r, err := f.Open()
		if err != nil {
			return nil, err
		}
		data, err := io.ReadAll(r)
		r.Close()
		if err != nil {
			return nil, err
		}
		files[name] = data
	}
	return files, nil
}

// SnapshotFiles are the files a snapshot of the checkout at root holds: go.mod, go.sum and the
// Go files, tests and generators left out, of the folders of module tally's packages that
// packages (a script's imports) need, by go list -deps.
func SnapshotFiles(root string, packages []string) (map[string][]byte, error) {
	cmd := exec.Command("go", append([]string{"list", "-deps", "-json=ImportPath,Dir,Module"}, packages...)...)
	cmd.Dir = root
	cmd.Env = append(os.Environ(), "GOFLAGS=-mod=mod")
	out, err := cmd.Output()
	if err != nil {
		return nil, fmt.Errorf("go list: %v", err)
	}
	files := map[string][]byte{}
	for _, n := range []string{"go.mod", "go.sum"} {
		b, err := os.ReadFile(filepath.Join(root, n))
		if err != nil {
			return nil, err
		}
		files[n] = b
	}
	dec := json.NewDecoder(bytes.NewReader(out))
	for dec.More() {
		var p struct {
			ImportPath, Dir string
			Module          *struct{ Path string }
		}
		if err := dec.Decode(&p); err != nil {
			return nil, err
		}
		if p.Module == nil || p.Module.Path != ModulePath {
			continue
		}
		es, err := os.ReadDir(p.Dir)
		if err != nil {
			return nil, err
		}
		rel, err := filepath.Rel(root, p.Dir)
		if err != nil {
			return nil, err
		}
		for _, e := range es {
			n := e.Name()
			if e.IsDir() || !strings.HasSuffix(n, ".go") || strings.HasSuffix(n, "_test.go") {
				continue
			}
			b, err := os.ReadFile(filepath.Join(p.Dir, n))
			if err != nil {
				return nil, err
			}
			if ignored(b) {
				continue // a generator (//go:build ignore): not part of the package
			}
			files[path.Join(filepath.ToSlash(rel), n)] = b
		}
	}
	return files, nil
}

// ignored says whether a Go file is excluded from every build by //go:build ignore.
func ignored(src []byte) bool {
	for _, l := range strings.Split(string(src), "\n") {
		l = strings.TrimSpace(l)
		if strings.HasPrefix(l, "package ") {
			return false
		}
		if l == "//go:build ignore" {
			return true
		}
	}
	return false
}

// PackSnapshot packs files into a snapshot: sorted, with no times, so the same files give the
// same bytes.
func PackSnapshot(files map[string][]byte) ([]byte, error) {
	names := make([]string, 0, len(files))
	for n := range files {
		names = append(names, n)
	}
	slices.Sort(names)
	var buf bytes.Buffer
	zw := zip.NewWriter(&buf)
	for _, n := range names {
		w, err := zw.CreateHeader(&zip.FileHeader{Name: n, Method: zip.Deflate, Modified: time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC)})
		if err != nil {
			return nil, err
		}
		if _, err := w.Write(files[n]); err != nil {
			return nil, err
		}
	}
	if err := zw.Close(); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}
