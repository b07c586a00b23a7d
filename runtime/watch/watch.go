// Package watch re-runs experiments on every save: tally watch.
//
// It watches the folders of the scripts, not the files, so editors that save by writing a
// temporary file and renaming it over the original are seen; a burst of events from one save
// is taken as one once the file has been quiet for Config.Debounce. A save cancels the run of
// that file in flight, whose partial outputs are dropped, and the new run starts at once. Runs
// of different files take turns, in the order they were saved. A folder given on the command
// line is watched for new experiment files (*.go with //go:build ignore); deleted ones are
// forgotten. After each successful run the watcher prints, per point, how the BER moved and
// whether the move is more than chance (see Changes).
//
// Host.Trust applies only to the files there when the watch starts; a file that appears later
// runs sandboxed. A watched folder that is removed or moved away and made again is noticed
// (folderPoll) and watched again. Config.Run makes each run: tally watch gives isolate.Run, so
// each run has its own process, which a newer save ends.
package watch

import (
	"context"
	"crypto/sha256"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"sort"
	"time"

	"github.com/fsnotify/fsnotify"

	"tally/runtime/host"
	"tally/runtime/output"
	"tally/runtime/progress"
	"tally/runtime/result"
)

// Config is how the watcher runs and reports.
type Config struct {
	Host host.Config // how each run is made; Host.Log receives its progress
	Out  io.Writer   // the watcher's own messages (default stdout)
	// Debounce is how long a file must be quiet after an event before it is run (default
	// 30 ms: editors finish a save within a few milliseconds, and a person notices 100).
	Debounce time.Duration
	// OnEvent, if set, is told of every step, on the watcher's goroutine.
	OnEvent func(Event)
	// Run makes one run (default host.Run, in this process; tally watch gives isolate.Run, a
	// child process per run). It must end soon after ctx ends.
	Run func(ctx context.Context, path string, cfg host.Config) error
	// Observe, if set, may add hooks to the host configuration of each run of file (to follow
	// its points as they are committed), on the watcher's goroutine before the run starts; Run
	// is given the configuration with those hooks (isolate.Run calls them in this process).
	Observe func(file string, c *host.Config)
}

// Kind is what happened to a watched file.
type Kind int

// The steps a watched file goes through.
const (
	Started   Kind = iota // a run began
	Finished              // a run succeeded and wrote its outputs
	Failed                // a run failed: a mistake in the script, or a run error
	Cancelled             // a run was cancelled by a newer save (or by the end of the watch)
	Unchanged             // a save left the file as it was last run: not re-run
	Added                 // a new experiment file appeared in a watched folder
	Forgotten             // a file was deleted (or stopped being an experiment)
	Watching              // a file found at the start of the watch, before its first run
)

// Event is one step of one file.
type Event struct {
	Kind Kind
	File string
	Err  error       // Failed
	Run  *result.Run // Finished
	// Changes are the what-changed lines printed after a Finished run (see Changes; nil for a
	// first run with no earlier outputs).
	Changes []string
	Took    time.Duration
}

// missingGrace is how long a vanished file may stay away (an editor's rename dance) before
// the watcher forgets it.
const missingGrace = 300 * time.Millisecond

type file struct {
	explicit bool        // named on the command line: kept even while it is missing
	trusted  bool        // there at the start: Host.Trust applies (later files run sandboxed)
	prev     *result.Run // the last good run, to compare the next one with
	hash     [32]byte    // content of the last run that completed (well or not)
	ran      bool
	missing  bool // seen missing once; forgotten if still missing after missingGrace
}

type job struct {
	path       string
	hash       [32]byte
	cancel     context.CancelFunc
	superseded bool
	start      time.Time
}

type outcome struct {
	job *job
	run *result.Run
	err error
}

type watcher struct {
	cfg     Config
	out     io.Writer
	fs      *fsnotify.Watcher
	dirs    map[string]bool
	watched map[string]os.FileInfo // the folders watched, as they were when watching began
	files   map[string]*file
	pending map[string]time.Time
	empty   map[string]bool // seen empty once (an editor between truncating and writing)
	queue   []string
	cur     *job
	done    chan outcome
	timer   *time.Timer
}

// Run watches paths (experiment files, or folders of them) until ctx ends: it runs every
// experiment once, then again on every save. Mistakes in scripts are printed and the watch
// goes on; only a path that cannot be watched at all is an error.
func Run(ctx context.Context, paths []string, cfg Config) error {
	if cfg.Debounce <= 0 {
		cfg.Debounce = 30 * time.Millisecond
	}
	// A point whose link is unchanged since the last good run replays its frames (reuse.go in
	// the runner) instead of computing them again.
	cfg.Host.Reuse = true
	w := &watcher{cfg: cfg, out: cfg.Out, dirs: map[string]bool{}, watched: map[string]os.FileInfo{}, files: map[string]*file{},
		pending: map[string]time.Time{}, empty: map[string]bool{}, done: make(chan outcome, 1)}
	if w.out == nil {
		w.out = os.Stdout
	}
	fsw, err := fsnotify.NewWatcher()
	if err != nil {
		return fmt.Errorf("watch: %w", err)
	}
	defer fsw.Close()
	w.fs = fsw
	if err := w.add(paths); err != nil {
		return err
	}
	w.timer = time.NewTimer(time.Hour)
	w.timer.Stop()
	names := make([]string, 0, len(w.files))
	for p := range w.files {
		names = append(names, p)
	}
	sort.Strings(names)
	w.queue = names
	for _, p := range names {
		w.emit(Event{Kind: Watching, File: p})
	}
	w.printf("watching %d experiment(s); save a file to re-run it, Ctrl-C to stop\n", len(names))
	w.next()
	return w.loop(ctx)
}

// add resolves the command line's paths into watched folders and files.
func (w *watcher) add(paths []string) error {
	if len(paths) == 0 {
		return errors.New("watch: no path to watch")
	}
	watched := map[string]bool{}
	for _, arg := range paths {
		p := filepath.Clean(arg)
		st, err := os.Stat(p)
		if err != nil {
			return fmt.Errorf("watch: %w", err)
		}
		dir := filepath.Dir(p)
		if st.IsDir() {
			dir = p
			w.dirs[p] = true
			found, err := experiments(p)
			if err != nil {
				return fmt.Errorf("watch: %w", err)
			}
			for _, f := range found {
				if w.files[f] == nil {
					w.files[f] = &file{prev: lastRun(f), trusted: true}
				}
			}
		} else {
			if f := w.files[p]; f != nil {
				f.explicit = true
			} else {
				w.files[p] = &file{explicit: true, prev: lastRun(p), trusted: true}
			}
		}
		if !watched[dir] {
			if err := w.fs.Add(dir); err != nil {
				return fmt.Errorf("watch: %s: %w", dir, err)
			}
			watched[dir] = true
			w.watched[dir], _ = os.Stat(dir)
		}
	}
	return nil
}

func (w *watcher) loop(ctx context.Context) error {
	// A watch follows a folder's inode: a folder moved away and made again (a checkout, a
	// sync tool) sends no event, so the folders are looked at now and then.
	poll := time.NewTicker(folderPoll)
	defer poll.Stop()
	for {
		select {
		case <-poll.C:
			w.checkFolders()
		case <-ctx.Done():
			w.stop()
			return nil
		case ev, ok := <-w.fs.Events:
			if !ok {
				return nil
			}
			w.event(ev)
		case err, ok := <-w.fs.Errors:
			if ok {
				w.printf("watch: %v\n", err)
			}
		case <-w.timer.C:
			w.flush()
		case o := <-w.done:
			w.finish(o)
		}
	}
}

// folderPoll is how often the watched folders are checked for being replaced.
var folderPoll = 500 * time.Millisecond

// checkFolders notices a watched folder that was removed or moved away, and watches it again
// once a folder of that name is back, looking at every experiment in it.
func (w *watcher) checkFolders() {
	for dir, was := range w.watched {
		st, err := os.Stat(dir)
		switch {
		case err != nil || !st.IsDir():
			if was != nil {
				w.printf("%s: the folder is gone; waiting for it to come back\n", dir)
				w.watched[dir] = nil
			}
		case was == nil || !os.SameFile(was, st):
			w.fs.Remove(dir) // the old folder's watch, if it still exists elsewhere
			if err := w.fs.Add(dir); err != nil {
				w.printf("watch: %s: %v\n", dir, err)
				continue
			}
			w.watched[dir] = st
			w.printf("%s: the folder was replaced; watching the new one\n", dir)
			for p := range w.files {
				if filepath.Dir(p) == dir {
					w.later(p, w.cfg.Debounce)
				}
			}
			if w.dirs[dir] {
				found, _ := experiments(dir)
				for _, p := range found {
					w.later(p, w.cfg.Debounce)
				}
			}
		}
	}
}

// stop cancels the run in flight and waits a little for it to let go.
func (w *watcher) stop() {
	if w.cur == nil {
		return
	}
	w.cur.superseded = true
	w.cur.cancel()
	select {
	case o := <-w.done:
		w.emit(Event{Kind: Cancelled, File: o.job.path})
	case <-time.After(3 * time.Second):
	}
}

func (w *watcher) event(ev fsnotify.Event) {
	if ev.Op == fsnotify.Chmod {
		return
	}
	p := filepath.Clean(ev.Name)
	if !candidate(p) || (w.files[p] == nil && !w.dirs[filepath.Dir(p)]) {
		return
	}
	w.later(p, w.cfg.Debounce)
	// The file changed under its run: that run's figures are stale, stop it now.
	if w.cur != nil && w.cur.path == p && !w.cur.superseded {
		w.cur.superseded = true
		w.cur.cancel()
	}
}

// later looks at p again after d, unless something is already due sooner.
func (w *watcher) later(p string, d time.Duration) {
	w.pending[p] = time.Now().Add(d)
	w.arm()
}

func (w *watcher) arm() {
	var first time.Time
	for _, t := range w.pending {
		if first.IsZero() || t.Before(first) {
			first = t
		}
	}
	if first.IsZero() {
		return
	}
	w.timer.Reset(max(0, time.Until(first)))
}

// flush handles every file whose quiet time is over.
func (w *watcher) flush() {
	now := time.Now()
	var due []string
	for p, t := range w.pending {
		if !t.After(now) {
			due = append(due, p)
		}
	}
	sort.Strings(due)
	for _, p := range due {
		delete(w.pending, p)
		w.settle(p)
	}
	w.arm()
	w.next()
}

// settle decides what a save of p calls for: a run, nothing, or forgetting the file.
func (w *watcher) settle(p string) {
	f := w.files[p]
	src, err := os.ReadFile(p)
	if err != nil {
		if f == nil {
			return
		}
		if !f.missing {
			f.missing = true
			w.later(p, missingGrace)
			return
		}
		w.drop(p)
		if f.explicit {
			w.printf("%s: deleted; waiting for it to come back\n", p)
			return
		}
		delete(w.files, p)
		w.printf("%s: deleted, no longer watched\n", p)
		w.emit(Event{Kind: Forgotten, File: p})
		return
	}
	if len(src) == 0 && !w.empty[p] {
		// Truncated and most likely about to be written: look once more before judging.
		w.empty[p] = true
		w.later(p, w.cfg.Debounce)
		return
	}
	delete(w.empty, p)
	if f == nil {
		if !isExperiment(src) {
			return
		}
		f = &file{prev: lastRun(p)}
		w.files[p] = f
		if w.cfg.Host.Trust {
			w.printf("%s: new experiment, run sandboxed (-trust covers only the files there at the start)\n", p)
		} else {
			w.printf("%s: new experiment\n", p)
		}
		w.emit(Event{Kind: Added, File: p})
	} else if !f.explicit && !isExperiment(src) {
		w.drop(p)
		delete(w.files, p)
		w.printf("%s: no longer an experiment (no //go:build ignore), not watched\n", p)
		w.emit(Event{Kind: Forgotten, File: p})
		return
	}
	f.missing = false
	running := w.cur != nil && w.cur.path == p
	if f.ran && sha256.Sum256(src) == f.hash && !running && !w.queued(p) {
		w.printf("%s: unchanged since its last run\n", p)
		w.emit(Event{Kind: Unchanged, File: p})
		return
	}
	if !w.queued(p) {
		w.queue = append(w.queue, p)
	}
}

// drop removes p from the queue and cancels its run.
func (w *watcher) drop(p string) {
	for i, q := range w.queue {
		if q == p {
			w.queue = append(w.queue[:i], w.queue[i+1:]...)
			break
		}
	}
	if w.cur != nil && w.cur.path == p && !w.cur.superseded {
		w.cur.superseded = true
		w.cur.cancel()
	}
}

func (w *watcher) queued(p string) bool {
	for _, q := range w.queue {
		if q == p {
			return true
		}
	}
	return false
}

// errSuperseded refuses the outputs of a run that was cancelled: a newer run follows, and
// the last good outputs stay until it succeeds.
var errSuperseded = errors.New("run cancelled by a newer save; outputs not written")

// next starts the first queued run when none is in flight.
func (w *watcher) next() {
	if w.cur != nil || len(w.queue) == 0 {
		return
	}
	p := w.queue[0]
	w.queue = w.queue[1:]
	src, _ := os.ReadFile(p)
	ctx, cancel := context.WithCancel(context.Background())
	j := &job{path: p, hash: sha256.Sum256(src), cancel: cancel, start: time.Now()}
	w.cur = j
	cfg := w.cfg.Host
	cfg.Trust = cfg.Trust && w.files[p] != nil && w.files[p].trusted
	var got *result.Run
	user := cfg.Done
	cfg.Done = func(r *result.Run) error {
		if ctx.Err() != nil || r.Interrupted {
			return errSuperseded
		}
		if user != nil {
			if err := user(r); err != nil {
				return err
			}
		}
		got = r
		return nil
	}
	if w.cfg.Observe != nil {
		w.cfg.Observe(p, &cfg)
	}
	w.printf("%s: running\n", p)
	w.emit(Event{Kind: Started, File: p})
	go func() {
		run := w.cfg.Run
		if run == nil {
			run = host.Run
		}
		err := run(ctx, p, cfg)
		cancel()
		w.done <- outcome{job: j, run: got, err: err}
	}()
}

// finish reports a run that ended and starts the next.
func (w *watcher) finish(o outcome) {
	w.cur = nil
	j, f := o.job, w.files[o.job.path]
	took := time.Since(j.start)
	switch {
	case o.err == nil && o.run != nil:
		// A run that completed before its cancel took effect is still a good run.
		var changes []string
		if f != nil {
			prev := f.prev
			f.prev, f.hash, f.ran = o.run, j.hash, true
			if !j.superseded {
				changes = w.report(j.path, prev, o.run, took)
			}
		}
		w.emit(Event{Kind: Finished, File: j.path, Run: o.run, Changes: changes, Took: took})
	case j.superseded:
		w.printf("%s: changed during its run; the run was stopped, its outputs dropped\n", j.path)
		w.emit(Event{Kind: Cancelled, File: j.path, Took: took})
	default:
		if f != nil {
			f.hash, f.ran = j.hash, true
		}
		err := o.err
		var se *host.ScriptError
		if errors.As(err, &se) {
			w.printf("%s\n", se.Error())
		} else {
			w.printf("%s: %v\n", j.path, err)
		}
		w.printf("%s: failed; the last good outputs are kept\n", j.path)
		w.emit(Event{Kind: Failed, File: j.path, Err: err, Took: took})
	}
	w.next()
}

// report prints a finished run and what changed since the last, and returns those lines.
func (w *watcher) report(path string, prev, run *result.Run, took time.Duration) []string {
	reused := ""
	n := 0
	for _, p := range run.Points {
		if p.FramesReused > 0 && p.FramesReused == p.Frames {
			n++
		}
	}
	if n > 0 {
		reused = fmt.Sprintf(" (%d reused)", n)
	}
	w.printf("%s: %d points in %s → %s%c%s\n", path, len(run.Points), progress.Duration(took), output.Dir(path), filepath.Separator, reused)
	if prev == nil {
		return nil
	}
	lines := Changes(prev, run)
	if len(lines) == 0 {
		return nil
	}
	w.printf("  since the last run:\n")
	for _, l := range lines {
		w.printf("    %s\n", l)
	}
	return lines
}

func (w *watcher) emit(e Event) {
	if w.cfg.OnEvent != nil {
		w.cfg.OnEvent(e)
	}
}

func (w *watcher) printf(format string, a ...any) { fmt.Fprintf(w.out, format, a...) }
