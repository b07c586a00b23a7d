// Package page is the live page of tally watch: a small HTTP server that shows, per watched
// experiment, its error-rate plot, crossings, points table, what changed at the last save and
// the last script error, and updates them as points are committed (server-sent events).
//
// The page knows nothing of how runs are made. A Hub is told what happens through a few
// methods (RunStarted, PointCommitted, Progress, RunFinished, RunFailed, RunCancelled) and
// keeps, per experiment, what the page needs; Attach feeds a Hub from the watcher. Every
// asset is embedded, so the page needs no network; Snapshot writes the same view as one
// self-contained HTML file.
package page

import (
	"errors"
	"math"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
	"sync"
	"time"

	"tally/blocks/link"
	"tally/blocks/stats"
	"tally/blocks/stop"
	"tally/runtime/host"
	"tally/runtime/output"
	"tally/runtime/progress"
	"tally/runtime/result"
)

// The states an experiment is shown in.
const (
	Waiting   = "waiting"   // not run yet under this watch
	Running   = "running"   // a run is in progress
	Done      = "finished"  // the last run succeeded
	Failed    = "failed"    // the last run failed: a script mistake or a run error
	Cancelled = "cancelled" // the last run was stopped by a newer save
)

// Live is the state of a running point, what its progress bar shows.
type Live struct {
	Label   string  `json:"label"`   // the point's parameters, "ebn0_db=4 modem=QPSK"
	Index   int     `json:"index"`   // 0-based position in the sweep
	Total   int     `json:"total"`   // points in the sweep
	Tap     string  `json:"tap"`     // the governing tap: the one the rules count errors on
	Errors  int64   `json:"errors"`  // the governing tap's errors so far
	Goal    int64   `json:"goal"`    // errors the stop rules ask for on it (0: no such rule)
	Bits    int64   `json:"bits"`    // BER tap bits so far
	Cap     int64   `json:"cap"`     // bits the stop rules allow (0: no such rule)
	Rate    float64 `json:"rate"`    // bits per second so far
	Left    float64 `json:"left"`    // seconds left, estimated from the rates (-1: unknown)
	Elapsed float64 `json:"elapsed"` // seconds on this point
	BER     float64 `json:"ber"`     // the governing tap's estimate and fixed-n interval so far
	Low     float64 `json:"low"`
	High    float64 `json:"high"`
}

// LiveOf is the Live of a running point from what its progress line is given.
func LiveOf(p progress.Point, pr *stop.Progress) Live {
	ber, _ := pr.Tap(link.TapBER)
	tap := p.Tap
	if tap == "" {
		tap = link.TapBER
	}
	t, ok := pr.Tap(tap)
	if !ok {
		tap, t = link.TapBER, ber
	}
	l := Live{Label: p.Label, Index: p.Index, Total: p.Total, Tap: tap, Errors: t.Errors, Bits: ber.Trials,
		Elapsed: pr.Elapsed.Seconds(), Left: -1, BER: math.NaN(), Low: math.NaN(), High: math.NaN()}
	l.Goal, l.Cap = progress.GoalsOn(p.Rules, tap)
	if l.Elapsed > 0 {
		l.Rate = float64(ber.Trials) / l.Elapsed
	}
	if left, ok := progress.Left(p.Rules, pr); ok {
		l.Left = left.Seconds()
	}
	conf := p.Confidence
	if conf == 0 {
		conf = 0.95
	}
	if t.Trials > 0 {
		if e, err := stats.Interval(p.Method, t.Errors, t.Trials, conf); err == nil {
			l.BER, l.Low, l.High = e.Rate, e.Low, e.High
		}
	}
	return l
}

// Failure is a failed run's error: for a script mistake its file:line:col and message.
type Failure struct {
	Pos string `json:"pos,omitempty"`
	Msg string `json:"msg"`
}

// view is what the page knows of one experiment (its JSON is the page's data).
type view struct {
	ID       string      `json:"id"`
	File     string      `json:"file"`   // the script, as given to the watcher
	Status   string      `json:"status"` // Waiting, Running, Done, Failed, Cancelled
	Seq      int         `json:"seq"`    // runs started since the page began
	Since    int64       `json:"since"`  // when the status last changed, Unix milliseconds
	Took     float64     `json:"took,omitempty"`
	Good     *result.Run `json:"good,omitempty"`    // the last good run (from disk until one ends)
	Changes  []string    `json:"changes,omitempty"` // what changed at the last good run
	Live     *result.Run `json:"live,omitempty"`    // the run in progress: header and points so far
	Total    int         `json:"total,omitempty"`   // points in the run in progress
	Progress *Live       `json:"progress,omitempty"`
	Error    *Failure    `json:"error,omitempty"` // the last run's failure
	Files    []string    `json:"files,omitempty"` // output files the page may link to
	Removed  bool        `json:"removed,omitempty"`
}

// Hub keeps what the page shows and sends every change to the connected pages. Its methods
// may be called from any goroutine.
type Hub struct {
	mu   sync.Mutex
	exps map[string]*view // by file
	ids  map[string]string
	subs map[chan []byte]bool
	now  func() time.Time
}

// NewHub is an empty hub.
func NewHub() *Hub {
	return &Hub{exps: map[string]*view{}, ids: map[string]string{}, subs: map[chan []byte]bool{}, now: time.Now}
}

// Watch adds an experiment file to the page, with the results on disk beside it, if any.
func (h *Hub) Watch(file string) {
	h.mu.Lock()
	defer h.mu.Unlock()
	h.ensure(file)
}

func (h *Hub) ensure(file string) *view {
	if v := h.exps[file]; v != nil {
		return v
	}
	v := &view{ID: h.newID(file), File: file, Status: Waiting, Since: h.now().UnixMilli(), Good: onDisk(file)}
	v.Files = outputFiles(file)
	h.exps[file] = v
	h.ids[v.ID] = file
	return v
}

// newID is a short name for the page's links: the script's base name, made unique.
func (h *Hub) newID(file string) string {
	base := strings.TrimSuffix(filepath.Base(file), filepath.Ext(file))
	var b strings.Builder
	for _, r := range base {
		if r < 128 && (r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9' || r == '-' || r == '_') {
			b.WriteRune(r)
		} else {
			b.WriteByte('-')
		}
	}
	id := b.String()
	if id == "" {
		id = "x"
	}
	for k, cand := 2, id; ; k++ {
		if _, taken := h.ids[cand]; !taken {
			return cand
		}
		cand = id + "-" + strconv.Itoa(k)
	}
}

// Forget removes an experiment (its file was deleted).
func (h *Hub) Forget(file string) {
	h.mu.Lock()
	defer h.mu.Unlock()
	v := h.exps[file]
	if v == nil {
		return
	}
	delete(h.exps, file)
	delete(h.ids, v.ID)
	h.send("exp", view{ID: v.ID, File: v.File, Removed: true})
}

// RunStarted says a run of file began (a save, or the first run).
func (h *Hub) RunStarted(file string) {
	h.mu.Lock()
	defer h.mu.Unlock()
	v := h.ensure(file)
	v.Status, v.Seq, v.Since, v.Took = Running, v.Seq+1, h.now().UnixMilli(), 0
	v.Live, v.Total, v.Progress = nil, 0, nil
	h.send("exp", v)
}

// point is the message of a committed point: the run's header, the point and its position.
type point struct {
	ID    string       `json:"id"`
	Seq   int          `json:"seq"`
	Total int          `json:"total"`
	Head  *result.Run  `json:"head"` // the run so far without its points
	Point result.Point `json:"point"`
	N     int          `json:"n"` // points committed, this one included
}

// PointCommitted says a point of the running run of file was committed: run is the run so
// far (its last point the new one), total the points in the sweep. Nothing of run is kept.
func (h *Hub) PointCommitted(file string, run *result.Run, total int) {
	if len(run.Points) == 0 {
		return
	}
	h.mu.Lock()
	defer h.mu.Unlock()
	v := h.exps[file]
	if v == nil || v.Status != Running {
		return
	}
	if v.Live == nil {
		v.Live = &result.Run{}
	}
	pts := v.Live.Points
	*v.Live = *run
	v.Live.Params, v.Live.Taps, v.Live.Theory = clone(run.Params), clone(run.Taps), clone(run.Theory)
	v.Live.Labels, v.Live.Targets, v.Live.Scatter = nil, nil, nil
	for _, l := range run.Labels {
		v.Live.Labels = append(v.Live.Labels, clone(l))
	}
	p := copyPoint(run.Points[len(run.Points)-1])
	v.Live.Points = append(pts, p)
	v.Total, v.Progress = total, nil
	head := *v.Live
	head.Points = nil
	h.send("point", point{ID: v.ID, Seq: v.Seq, Total: total, Head: &head, Point: p, N: len(v.Live.Points)})
}

// progressMsg is the message of a running point's progress.
type progressMsg struct {
	ID   string `json:"id"`
	Seq  int    `json:"seq"`
	Live Live   `json:"live"`
}

// Progress says how the running point of file is going.
func (h *Hub) Progress(file string, l Live) {
	h.mu.Lock()
	defer h.mu.Unlock()
	v := h.exps[file]
	if v == nil || v.Status != Running {
		return
	}
	v.Progress = &l
	h.send("progress", progressMsg{ID: v.ID, Seq: v.Seq, Live: l})
}

// RunFinished says the run of file succeeded with run; changes are the what-changed lines.
func (h *Hub) RunFinished(file string, run *result.Run, changes []string, took time.Duration) {
	h.mu.Lock()
	defer h.mu.Unlock()
	v := h.ensure(file)
	v.Status, v.Since, v.Took = Done, h.now().UnixMilli(), took.Seconds()
	v.Good, v.Changes, v.Error = run, changes, nil
	v.Live, v.Total, v.Progress = nil, 0, nil
	v.Files = outputFiles(file)
	h.send("exp", v)
}

// RunFailed says the run of file failed; the last good run stays, shown as stale.
func (h *Hub) RunFailed(file string, err error, took time.Duration) {
	h.mu.Lock()
	defer h.mu.Unlock()
	v := h.ensure(file)
	v.Status, v.Since, v.Took = Failed, h.now().UnixMilli(), took.Seconds()
	v.Error = failure(err)
	v.Live, v.Total, v.Progress = nil, 0, nil
	h.send("exp", v)
}

// RunCancelled says the run of file was stopped by a newer save (a new run follows).
func (h *Hub) RunCancelled(file string) {
	h.mu.Lock()
	defer h.mu.Unlock()
	v := h.exps[file]
	if v == nil {
		return
	}
	v.Status, v.Since = Cancelled, h.now().UnixMilli()
	v.Live, v.Total, v.Progress = nil, 0, nil
	h.send("exp", v)
}

func failure(err error) *Failure {
	if err == nil {
		return &Failure{Msg: "the run failed"}
	}
	var se *host.ScriptError
	if errors.As(err, &se) {
		return &Failure{Pos: se.Pos, Msg: se.Msg}
	}
	return &Failure{Msg: err.Error()}
}

// state is the message a page gets first: every experiment, in file order.
type state struct {
	Exps []*view `json:"exps"`
}

func (h *Hub) stateLocked() state {
	files := make([]string, 0, len(h.exps))
	for f := range h.exps {
		files = append(files, f)
	}
	sort.Strings(files)
	s := state{Exps: make([]*view, 0, len(files))}
	for _, f := range files {
		s.Exps = append(s.Exps, h.exps[f])
	}
	return s
}

// subscribe returns the first message (the whole state) and a channel of the following ones;
// a page too slow to take its messages is dropped (the channel closed) and reconnects.
func (h *Hub) subscribe() ([]byte, chan []byte) {
	h.mu.Lock()
	defer h.mu.Unlock()
	ch := make(chan []byte, 512)
	h.subs[ch] = true
	return message("state", h.stateLocked()), ch
}

func (h *Hub) unsubscribe(ch chan []byte) {
	h.mu.Lock()
	defer h.mu.Unlock()
	if h.subs[ch] {
		delete(h.subs, ch)
		close(ch)
	}
}

// Close ends every page's event stream (the pages then try to reconnect).
func (h *Hub) Close() {
	h.mu.Lock()
	defer h.mu.Unlock()
	for ch := range h.subs {
		delete(h.subs, ch)
		close(ch)
	}
}

// send encodes one event for every subscriber; h.mu is held.
func (h *Hub) send(event string, v any) {
	if len(h.subs) == 0 {
		return
	}
	m := message(event, v)
	for ch := range h.subs {
		select {
		case ch <- m:
		default:
			delete(h.subs, ch)
			close(ch)
		}
	}
}

// message is one server-sent event; its data is one line of JSON.
func message(event string, v any) []byte {
	b, err := JSON(v)
	if err != nil {
		b, _ = JSON(map[string]string{"error": err.Error()})
		event = "fault"
	}
	out := make([]byte, 0, len(b)+len(event)+16)
	out = append(out, "event: "...)
	out = append(out, event...)
	out = append(out, "\ndata: "...)
	out = append(out, b...)
	return append(out, "\n\n"...)
}

func clone(s []string) []string { return append([]string(nil), s...) }

func copyPoint(p result.Point) result.Point {
	p.Values = append([]float64(nil), p.Values...)
	p.Taps = append([]result.Tap(nil), p.Taps...)
	p.Theory = append([]float64(nil), p.Theory...)
	return p
}

// onDisk reads the run record beside a script (the outputs of an earlier run); nil if none.
func onDisk(script string) *result.Run { return output.ReadRecord(output.Dir(script)) }
