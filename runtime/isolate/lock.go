package isolate

import (
	"encoding/json"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"time"

	"tally/runtime/longrun"
)

// A results folder is written by one run at a time: the run holds a lock file in it, locked by
// the operating system (so a run that dies lets go at once) and holding who holds it.

// Holder is what a lock file says about the run that holds it.
type Holder struct {
	PID   int       `json:"pid"`
	Host  string    `json:"host"`
	Start time.Time `json:"start"`
}

// Busy is the error of a folder another run holds.
type Busy struct {
	Dir    string
	Holder Holder // zero when the lock file could not be read
}

func (e *Busy) Error() string {
	h := e.Holder
	if h.PID == 0 {
		return fmt.Sprintf("%s%c is in use by another tally run; wait for it to end, or stop it", e.Dir, filepath.Separator)
	}
	return fmt.Sprintf("%s%c is in use by another tally run (pid %d on %s, started %s); wait for it to end, or stop it",
		e.Dir, filepath.Separator, h.PID, h.Host, h.Start.Local().Format("2006-01-02 15:04:05"))
}

// lockName is the lock file of a run in its outputs folder: one for the folder, or one per
// shard, so the shards of one script can run side by side.
func lockName(s *longrun.Part) string {
	if s != nil {
		return fmt.Sprintf(".lock-shard-%d-of-%d", s.Index, s.Of)
	}
	return ".lock"
}

// Lock takes the lock file name in dir (made if need be) for this process. release lets it
// go, removes the file, and removes dir again if the run left it empty.
func Lock(dir, name string) (release func(), err error) {
	made := false
	if _, err := os.Stat(dir); errors.Is(err, os.ErrNotExist) {
		made = true
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, fmt.Errorf("tally: %w", err)
	}
	path := filepath.Join(dir, name)
	f, err := lockFile(path)
	if err != nil {
		if made {
			os.Remove(dir)
		}
		if errors.Is(err, errHeld) {
			b := &Busy{Dir: dir}
			if data, rerr := os.ReadFile(path); rerr == nil {
				json.Unmarshal(data, &b.Holder)
			}
			return nil, b
		}
		return nil, fmt.Errorf("tally: cannot lock %s: %w", dir, err)
	}
	host, _ := os.Hostname()
	data, _ := json.Marshal(Holder{PID: os.Getpid(), Host: host, Start: time.Now().UTC()})
	f.Truncate(0)
	f.WriteAt(append(data, '\n'), 0)
	return func() {
		os.Remove(path) // before letting go, so no one locks a file about to vanish
		f.Close()
		os.Remove(dir) // only if empty
	}, nil
}

var errHeld = errors.New("held by another process")

// cleanTemps removes the temporary files a killed writer left in dir (.NAME.tmp-*): the lock
// says no other run writes there now. With a shard, only that shard's own.
func cleanTemps(dir string, s *longrun.Part) {
	pattern := filepath.Join(dir, ".*.tmp-*")
	if s != nil {
		pattern = filepath.Join(longrun.ShardDir(dir), "."+filepath.Base(longrun.ShardPath(dir, *s))+".tmp-*")
	}
	names, _ := filepath.Glob(pattern)
	for _, n := range names {
		if st, err := os.Lstat(n); err == nil && st.Mode().IsRegular() && strings.Contains(filepath.Base(n), ".tmp-") {
			os.Remove(n)
		}
	}
}
