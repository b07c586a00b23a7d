package output

import (
	"bufio"
	"bytes"
	"compress/gzip"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"

	"tally/runtime/framelog"
	"tally/runtime/result"
)

// FramesName is the file beside run.json that keeps every point's committed per-frame counts.
const FramesName = "frames.gz"

// framesMagic begins the decompressed file; the version changes with its layout.
const framesMagic = "tally frames v1\n"

// Frames is frames.gz: gzip of framesMagic, then the number of points kept and, per point, its
// index in run.json's points, its link fingerprint (a length and the bytes) and its log
// (framelog.Log.WriteTo: unsigned varints). Points without a usable log are left out. gzip's
// own checksum refuses a torn file. The bytes depend on the counts only, so they are the same
// for any number of workers, as table.csv is.
func Frames(r *result.Run) []byte {
	var raw bytes.Buffer
	raw.WriteString(framesMagic)
	var kept []int
	for i, p := range r.Points {
		if p.Log.Usable() && p.Log.Frames == p.Frames && p.LinkFingerprint != "" {
			kept = append(kept, i)
		}
	}
	raw.Write(binary.AppendUvarint(nil, uint64(len(kept))))
	for _, i := range kept {
		p := r.Points[i]
		raw.Write(binary.AppendUvarint(nil, uint64(i)))
		raw.Write(binary.AppendUvarint(nil, uint64(len(p.LinkFingerprint))))
		raw.WriteString(p.LinkFingerprint)
		p.Log.WriteTo(&raw)
	}
	var out bytes.Buffer
	zw, _ := gzip.NewWriterLevel(&out, gzip.BestCompression)
	zw.Write(raw.Bytes())
	zw.Close()
	return out.Bytes()
}

// ReadFrames gives the points of r (read from run.json in dir) their per-frame counts from
// frames.gz in dir: a point gets the log kept under its index when the log's link fingerprint
// and frame count are the point's. It reports the points that got one; a folder without the
// file (an older run) or a damaged file gives none, and the error says which.
func ReadFrames(dir string, r *result.Run) (int, error) {
	f, err := os.Open(filepath.Join(dir, FramesName))
	if err != nil {
		return 0, err
	}
	defer f.Close()
	zr, err := gzip.NewReader(f)
	if err != nil {
		return 0, fmt.Errorf("%s: %w", FramesName, err)
	}
	// The whole file is read (and so its checksum checked) before any log is given out.
	data, err := io.ReadAll(io.LimitReader(zr, 1<<32))
	if err != nil {
		return 0, fmt.Errorf("%s: %w", FramesName, err)
	}
	if !bytes.HasPrefix(data, []byte(framesMagic)) {
		return 0, fmt.Errorf("%s: not a tally frames file of this version", FramesName)
	}
	br := bufio.NewReader(bytes.NewReader(data[len(framesMagic):]))
	n, err := binary.ReadUvarint(br)
	if err != nil {
		return 0, fmt.Errorf("%s: %w", FramesName, err)
	}
	logs := map[int]*framelog.Log{}
	prints := map[int]string{}
	for range n {
		i, err := binary.ReadUvarint(br)
		if err != nil {
			return 0, fmt.Errorf("%s: %w", FramesName, err)
		}
		m, err := binary.ReadUvarint(br)
		if err != nil || m > 1024 {
			return 0, fmt.Errorf("%s: %w", FramesName, errors.Join(err, errors.New("damaged")))
		}
		fp := make([]byte, m)
		if _, err := io.ReadFull(br, fp); err != nil {
			return 0, fmt.Errorf("%s: %w", FramesName, err)
		}
		l, err := framelog.Read(br)
		if err != nil {
			return 0, fmt.Errorf("%s: %w", FramesName, err)
		}
		logs[int(i)], prints[int(i)] = l, string(fp)
	}
	got := 0
	for i := range r.Points {
		p := &r.Points[i]
		if l := logs[i]; l != nil && prints[i] == p.LinkFingerprint && p.LinkFingerprint != "" && l.Frames == p.Frames {
			p.Log = l
			got++
		}
	}
	return got, nil
}
