// Package compile builds an experiment script with the Go toolchain into a program of its own,
// so a run started in the interpreter can be handed over to it (runtime/isolate): the same
// file, compiled, gives the same table.
//
// A build needs the go command on PATH and the module cache tally was installed with; it runs
// offline (GOPROXY=off, GOFLAGS=-mod=mod, its environment set explicitly). tally's own source
// comes from the checkout of module tally the script sits in, if it does, else from a snapshot
// of the module's sources embedded in tally (snapshot.go), unpacked once into the cache.
// Binaries are cached by the script's bytes, tally's version and sources, and the Go version:
// a script saved back to earlier bytes finds its binary again.
package compile

import (
	"bytes"
	"context"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"runtime"
	"runtime/debug"
	"strings"
	"time"
)

// Request is a script to build.
type Request struct {
	Script string // its path, as the user named it (messages use it)
	Source []byte // the bytes to build (what the interpreter runs)
	Cache  string // the cache folder ("" : DefaultCache())
	Tool   string // tally's version (folded into the cache key)
}

// Binary is a built script.
type Binary struct {
	Path   string        // the executable
	Cached bool          // found in the cache, not built
	Took   time.Duration // the time to find or build it
	From   string        // where tally's source came from: "checkout" or "snapshot"
}

// Unavailable says why a script cannot be built: no toolchain, a build error, a module the
// offline cache lacks. Its text is a sentence for the user.
type Unavailable struct{ Why string }

func (u *Unavailable) Error() string { return u.Why }

// DefaultCache is the cache folder: $TALLY_CACHE, else tally/ in the user's cache folder.
func DefaultCache() string {
	if d := os.Getenv("TALLY_CACHE"); d != "" {
		return d
	}
	if d, err := os.UserCacheDir(); err == nil {
		return filepath.Join(d, "tally")
	}
	return filepath.Join(os.TempDir(), "tally-cache")
}

// Script builds the script, or finds it built; a *Unavailable says why it cannot be.
func Script(ctx context.Context, r Request) (*Binary, error) {
	start := time.Now()
	cache := r.Cache
	if cache == "" {
		cache = DefaultCache()
	}
	tc, err := findToolchain(ctx)
	if err != nil {
		return nil, err
	}
	mod, err := moduleFor(r.Script, cache)
	if err != nil {
		return nil, err
	}
	key := cacheKey(r.Tool, r.Source, tc, mod)
	bin := filepath.Join(cache, "bin", key)
	b := &Binary{Path: bin, From: mod.from}
	if st, err := os.Stat(bin); err == nil && st.Mode().IsRegular() {
		now := time.Now()
		os.Chtimes(bin, now, now) // recently used: kept by prune
		b.Cached, b.Took = true, time.Since(start)
		return b, nil
	}
	if err := build(ctx, r, tc, mod, cache, key, bin); err != nil {
		return nil, err
	}
	prune(filepath.Join(cache, "bin"), keepBinaries)
	b.Took = time.Since(start)
	return b, nil
}

// cacheKey names a binary by everything its bytes depend on.
func cacheKey(tool string, src []byte, tc *toolchain, mod *module) string {
	h := sha256.New()
	s := sha256.Sum256(src)
	fmt.Fprintf(h, "tally build 2\n%s\n%s\n%s/%s %s\n%s\n%x\n", tool, tc.version, runtime.GOOS, runtime.GOARCH, tc.amd64, mod.hash, s)
	return hex.EncodeToString(h.Sum(nil))[:32]
}

// build compiles the script into bin: a copy of its bytes in a folder of its own, built with
// tally's module as the main module, into a temporary file renamed into place.
func build(ctx context.Context, r Request, tc *toolchain, mod *module, cache, key, bin string) error {
	// A folder of this build's own: two builds of the same bytes (two tally processes, a watch
	// rerun beside a cancelled build) must not write or remove each other's files.
	if err := os.MkdirAll(filepath.Join(cache, "work"), 0o755); err != nil {
		return &Unavailable{Why: fmt.Sprintf("cannot make the build folder in the cache %s: %v", cache, err)}
	}
	work, err := os.MkdirTemp(filepath.Join(cache, "work"), key+"-")
	if err != nil {
		return &Unavailable{Why: fmt.Sprintf("cannot make the build folder in the cache %s: %v", cache, err)}
	}
	defer os.RemoveAll(work)
	file := filepath.Join(work, "main.go")
	if err := os.WriteFile(file, r.Source, 0o644); err != nil {
		return &Unavailable{Why: fmt.Sprintf("cannot write into the cache %s: %v", cache, err)}
	}
	if err := os.MkdirAll(filepath.Dir(bin), 0o755); err != nil {
		return &Unavailable{Why: fmt.Sprintf("cannot write into the cache %s: %v", cache, err)}
	}
	tmp := filepath.Join(work, "program") // renamed into place: the cache and work share a file system
	// Without a symbol table and DWARF (-s -w) the link takes a quarter less time; a panic's
	// stack still names functions and lines (they are in the program's own tables).
	cmd := grouped(ctx, tc.gocmd, "build", "-trimpath", "-ldflags=-s -w", "-o", tmp, file)
	cmd.Dir = mod.dir
	cmd.Env = tc.env()
	var out bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &out
	if err := cmd.Run(); err != nil {
		if ctx.Err() != nil {
			return ctx.Err()
		}
		return &Unavailable{Why: buildError(out.String(), file, mod.dir, r.Script)}
	}
	if err := os.Rename(tmp, bin); err != nil {
		return &Unavailable{Why: fmt.Sprintf("cannot write into the cache %s: %v", cache, err)}
	}
	return nil
}

var offlineRE = regexp.MustCompile(`(?m)^.*?([a-z0-9.\-]+\.[a-z]+/[^@\s:]+)@(v[^:\s]+).*(GOPROXY=off|module lookup disabled)`)

// buildError is a sentence for the go command's complaint (run in dir on file): the compiler's
// first message at the script's position, or the module the offline cache lacks.
func buildError(out, file, dir, script string) string {
	if m := offlineRE.FindStringSubmatch(out); m != nil {
		return fmt.Sprintf("the Go module cache lacks %s %s, which tally needs (the build runs offline)", m[1], m[2])
	}
	if strings.Contains(out, "GOPROXY=off") || strings.Contains(out, "module lookup disabled") {
		return "the Go module cache lacks a module tally needs (the build runs offline)"
	}
	if m := regexp.MustCompile(`go: go\.mod requires go >= ([^\s;)]+) \(running go ([^\s;)]+)`).FindStringSubmatch(out); m != nil {
		return fmt.Sprintf("the Go toolchain on PATH is go%s; tally's module needs go%s or later", strings.TrimPrefix(m[2], "go"), m[1])
	}
	for _, l := range strings.Split(out, "\n") {
		l = strings.TrimSpace(l)
		if l == "" || strings.HasPrefix(l, "#") {
			continue
		}
		l = strings.ReplaceAll(l, "command-line-arguments/main.go", script)
		l = strings.ReplaceAll(l, file, script)
		if rel, err := filepath.Rel(dir, file); err == nil {
			l = strings.ReplaceAll(l, rel, script) // the go command names files relative to its folder when shorter
		}
		l = strings.ReplaceAll(l, "./main.go", script)
		return "the compiler refused the script: " + l
	}
	return "the build failed without a message"
}

// toolchain is the go command found on PATH and what it says of itself.
type toolchain struct {
	gocmd   string
	version string // go1.26.0
	modules string // GOMODCACHE
	gocache string // GOCACHE
	gopath  string
	amd64   string // GOAMD64 the build uses: tally's own
}

func findToolchain(ctx context.Context) (*toolchain, error) {
	gocmd, err := exec.LookPath("go")
	if err != nil {
		return nil, &Unavailable{Why: "no Go toolchain (go) on PATH"}
	}
	cmd := grouped(ctx, gocmd, "env", "GOVERSION", "GOMODCACHE", "GOCACHE", "GOPATH")
	cmd.Env = append(os.Environ(), "GOTOOLCHAIN=local", "GOFLAGS=")
	out, err := cmd.Output()
	if ctx.Err() != nil {
		return nil, ctx.Err()
	}
	lines := strings.Split(strings.TrimRight(string(out), "\n"), "\n")
	if err != nil || len(lines) != 4 || lines[0] == "" {
		return nil, &Unavailable{Why: fmt.Sprintf("the go command on PATH (%s) does not answer go env", gocmd)}
	}
	tc := &toolchain{gocmd: gocmd, version: lines[0], modules: lines[1], gocache: lines[2], gopath: lines[3], amd64: "v1"}
	if bi, ok := debug.ReadBuildInfo(); ok {
		for _, s := range bi.Settings {
			if s.Key == "GOAMD64" && s.Value != "" {
				tc.amd64 = s.Value
			}
		}
	}
	return tc, nil
}

// env is the build's environment, set explicitly: offline, the module cache and build cache
// the user's go command uses, none of the user's GOFLAGS or go.work, this machine's platform.
func (tc *toolchain) env() []string {
	var env []string
	for _, kv := range os.Environ() {
		if !strings.HasPrefix(kv, "GO") && !strings.HasPrefix(kv, "CGO_") {
			env = append(env, kv)
		}
	}
	return append(env, "GOENV=off", "GOFLAGS=-mod=mod", "GOPROXY=off", "GOSUMDB=off", "GOWORK=off", "GOTOOLCHAIN=local",
		"CGO_ENABLED=0", "GOOS="+runtime.GOOS, "GOARCH="+runtime.GOARCH, "GOAMD64="+tc.amd64,
		"GOMODCACHE="+tc.modules, "GOCACHE="+tc.gocache, "GOPATH="+tc.gopath)
}

// keepBinaries is how many built scripts the cache keeps (the most recently used).
const keepBinaries = 24

// prune removes all but the keep most recently used files of dir.
func prune(dir string, keep int) {
	es, err := os.ReadDir(dir)
	if err != nil || len(es) <= keep {
		return
	}
	type aged struct {
		name string
		t    time.Time
	}
	var fs []aged
	for _, e := range es {
		if i, err := e.Info(); err == nil && i.Mode().IsRegular() && !strings.HasPrefix(e.Name(), ".") {
			fs = append(fs, aged{e.Name(), i.ModTime()})
		}
	}
	for len(fs) > keep {
		old := 0
		for i := range fs {
			if fs[i].t.Before(fs[old].t) {
				old = i
			}
		}
		os.Remove(filepath.Join(dir, fs[old].name))
		fs = append(fs[:old], fs[old+1:]...)
	}
}
