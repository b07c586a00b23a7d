// Package longrun holds what lets a run outlive its process and its machine: the checkpoint a
// run keeps of its committed counts (resume after a kill), the shard file of a run that
// computes only its share of every point's frames, the progress file in which shards side by
// side tell each other their counts (so each stops near where one machine would), the merge of
// shard files into the frame sequence of a single run, and the plan a short merge leaves for a
// further round.
//
// Every file is a one-line header and a JSON body:
//
//	tally <kind> v<version> <body length> sha256:<hex digest of the body>
//	{…}
//
// A reader checks the kind, the version, the length and the digest before it parses the body,
// so a torn or damaged file is refused, never read as valid. Writers replace files atomically
// (output.Atomic), so a kill leaves the previous file or the new one.
package longrun

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"tally/runtime/output"
)

// Version is the format version of the files this package writes. Version 2 added the
// weighted sums of the estimators (link.Estimator) beside the counts, version 3 the
// checkpoint's per-frame counts (PointState.Log); this package reads versions 1 to 3 (an
// earlier body is a later one without what was added).
const Version = 3

// File kinds.
const (
	KindCheckpoint = "checkpoint"
	KindShard      = "shard"
	KindPlan       = "plan"
)

// ErrDamaged is the error of a file that is torn, truncated or altered.
var ErrDamaged = errors.New("damaged (torn or altered): its length or checksum does not match")

// Encode is the file holding v as a body of the given kind.
func Encode(kind string, v any) ([]byte, error) {
	body, err := json.Marshal(v)
	if err != nil {
		return nil, err
	}
	sum := sha256.Sum256(body)
	var b bytes.Buffer
	fmt.Fprintf(&b, "tally %s v%d %d sha256:%s\n", kind, Version, len(body), hex.EncodeToString(sum[:]))
	b.Write(body)
	return b.Bytes(), nil
}

// Decode checks data as a file of the given kind and parses its body into v. The error names
// what is wrong, not the file (callers add its path).
func Decode(data []byte, kind string, v any) error {
	nl := bytes.IndexByte(data, '\n')
	if nl < 0 {
		return ErrDamaged
	}
	f := strings.Fields(string(data[:nl]))
	if len(f) != 5 || f[0] != "tally" || !strings.HasPrefix(f[4], "sha256:") {
		return fmt.Errorf("not a tally %s file", kind)
	}
	if f[1] != kind {
		return fmt.Errorf("a tally %s file, not a %s file", f[1], kind)
	}
	if f[2] != "v"+strconv.Itoa(Version) && f[2] != "v2" && f[2] != "v1" {
		return fmt.Errorf("format %s, this tally reads v%d", f[2], Version)
	}
	n, err := strconv.Atoi(f[3])
	body := data[nl+1:]
	if err != nil || n != len(body) {
		return ErrDamaged
	}
	sum := sha256.Sum256(body)
	if hex.EncodeToString(sum[:]) != f[4][len("sha256:"):] {
		return ErrDamaged
	}
	dec := json.NewDecoder(bytes.NewReader(body))
	dec.DisallowUnknownFields()
	if err := dec.Decode(v); err != nil {
		return fmt.Errorf("body: %w", err)
	}
	return nil
}

// Save writes v atomically to path as a file of the given kind.
func Save(path, kind string, v any) error {
	data, err := Encode(kind, v)
	if err != nil {
		return err
	}
	if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
		return err
	}
	return output.Atomic(path, data)
}

// Load reads path as a file of the given kind into v. A missing file gives an error for which
// errors.Is(err, os.ErrNotExist) holds; any other error names the file.
func Load(path, kind string, v any) error {
	data, err := os.ReadFile(path)
	if err != nil {
		return err
	}
	if err := Decode(data, kind, v); err != nil {
		return fmt.Errorf("%s: %w", path, err)
	}
	return nil
}
