//go:build unix

package isolate

import (
	"errors"
	"os"
	"syscall"
)

// lockFile opens and locks path, refusing with errHeld when another process holds it. A lock
// taken on a file that was removed meanwhile (its holder ended) is taken again on the new one.
func lockFile(path string) (*os.File, error) {
	for range 5 {
		f, err := os.OpenFile(path, os.O_RDWR|os.O_CREATE, 0o644)
		if err != nil {
			return nil, err
		}
		if err := syscall.Flock(int(f.Fd()), syscall.LOCK_EX|syscall.LOCK_NB); err != nil {
			f.Close()
			if errors.Is(err, syscall.EWOULDBLOCK) {
				return nil, errHeld
			}
			return nil, err
		}
		st1, err1 := f.Stat()
		st2, err2 := os.Stat(path)
		if err1 == nil && err2 == nil && os.SameFile(st1, st2) {
			return f, nil
		}
		f.Close()
	}
	return nil, errHeld
}
