package sim

import (
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"

	"tally/runtime/internal/runner"
	"tally/runtime/result"
)

// maxReadFile bounds what ReadFile returns: data for a block, not a data set.
const maxReadFile = 64 << 20

// ReadFile returns the text of a file in the script's folder or below it, for data a block
// takes as text, such as an LDPC matrix in the alist format:
//
//	code := fec.LDPCAlist(x.ReadFile("codes/relay.alist"))
//
// The name is relative to the script's folder and may not leave it: an absolute path, a ".."
// that climbs out, or a symbolic link that points outside is refused. It is the one file access
// a sandboxed script has, and it only reads. A file that cannot be read stops the script with
// its name. The file's SHA-256 goes into run.json beside the script's (inputs), since the
// results depend on it.
func (x *Experiment) ReadFile(name string) string {
	text, err := readScriptFile(x.opts.Script, name)
	if err != nil {
		runner.Fail(err)
	}
	sum := sha256.Sum256([]byte(text))
	x.spec.Inputs = append(x.spec.Inputs, result.Input{Name: filepath.ToSlash(name), SHA256: hex.EncodeToString(sum[:])})
	return text
}

// readScriptFile reads name relative to the folder of script, refusing any escape from it
// (os.Root resolves the path and its symbolic links within the folder).
func readScriptFile(script, name string) (string, error) {
	if !filepath.IsLocal(name) {
		return "", fmt.Errorf("sim.ReadFile: %q must be a path inside the script's folder (no absolute path, no ..)", name)
	}
	dir := filepath.Dir(script)
	if script == "" {
		dir = "."
	}
	root, err := os.OpenRoot(dir)
	if err != nil {
		return "", fmt.Errorf("sim.ReadFile: cannot open the script's folder for %q", name)
	}
	defer root.Close()
	f, err := root.Open(name)
	if err != nil {
		switch {
		case errors.Is(err, fs.ErrNotExist):
			return "", fmt.Errorf("sim.ReadFile: no file %q beside the script", name)
		case errors.Is(err, fs.ErrPermission):
			return "", fmt.Errorf("sim.ReadFile: %q may not be read", name)
		}
		return "", fmt.Errorf("sim.ReadFile: %q leads outside the script's folder or cannot be opened", name)
	}
	defer f.Close()
	if st, err := f.Stat(); err != nil || !st.Mode().IsRegular() {
		return "", fmt.Errorf("sim.ReadFile: %q is not a regular file", name)
	}
	b, err := io.ReadAll(io.LimitReader(f, maxReadFile+1))
	if err != nil {
		return "", fmt.Errorf("sim.ReadFile: %q could not be read", name)
	}
	if len(b) > maxReadFile {
		return "", fmt.Errorf("sim.ReadFile: %q is larger than %d MiB", name, maxReadFile>>20)
	}
	return string(b), nil
}
