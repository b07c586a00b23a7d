package output

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"tally/runtime/result"
)

// File is one output file's name and contents.
type File struct {
	Name string
	Data []byte
}

// Files are all the files of a run, in the order they are written.
func Files(r *result.Run) ([]File, error) {
	rec, err := Record(r)
	if err != nil {
		return nil, err
	}
	files := []File{{"table.csv", Table(r)}, {"run.json", rec}, {FramesName, Frames(r)}}
	plots, err := plotFiles(r)
	if err != nil {
		return nil, err
	}
	files = append(files, plots...)
	names := make([]string, len(plots))
	for i, f := range plots {
		names[i] = f.Name
	}
	files = append(files, File{"README.md", Summary(r, names)})
	return files, nil
}

// Write puts the run's files into dir. Every file is first written in full beside its target
// and then renamed over it, so a reader never sees a torn file; nothing is replaced unless all
// files were produced.
func Write(dir string, r *result.Run) error {
	files, err := Files(r)
	if err != nil {
		return err
	}
	return WriteFiles(dir, files)
}

// WriteFiles puts files into dir as Write does: each written in full beside its target, then
// all renamed into place, none when any could not be written.
func WriteFiles(dir string, files []File) error {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	var temps []string
	defer func() {
		for _, t := range temps {
			os.Remove(t)
		}
	}()
	for _, f := range files {
		t, err := writeTemp(dir, f)
		if err != nil {
			return err
		}
		temps = append(temps, t)
	}
	for i, f := range files {
		if err := os.Rename(temps[i], filepath.Join(dir, f.Name)); err != nil {
			return fmt.Errorf("output: %w", err)
		}
	}
	temps = nil
	return nil
}

// Atomic writes one file atomically (temp file in the same folder, then rename).
func Atomic(path string, data []byte) error {
	t, err := writeTemp(filepath.Dir(path), File{Name: filepath.Base(path), Data: data})
	if err != nil {
		return err
	}
	if err := os.Rename(t, path); err != nil {
		os.Remove(t)
		return err
	}
	return nil
}

func writeTemp(dir string, f File) (string, error) {
	tf, err := os.CreateTemp(dir, "."+f.Name+".tmp-*")
	if err != nil {
		return "", fmt.Errorf("output: %w", err)
	}
	// CreateTemp makes the file private; outputs are for colleagues to read.
	merr := tf.Chmod(0o644)
	_, werr := tf.Write(f.Data)
	serr := tf.Sync()
	cerr := tf.Close()
	if err := firstErr(merr, werr, serr, cerr); err != nil {
		os.Remove(tf.Name())
		return "", fmt.Errorf("output: %s: %w", f.Name, err)
	}
	return tf.Name(), nil
}

func firstErr(errs ...error) error {
	for _, e := range errs {
		if e != nil {
			return e
		}
	}
	return nil
}

// Dir is the folder beside a script that holds its outputs: dir/<name>.go → dir/<name>.
func Dir(script string) string {
	return strings.TrimSuffix(script, filepath.Ext(script))
}
