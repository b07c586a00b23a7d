package page

import (
	"context"
	"math"
	"os"
	"path/filepath"
	"sync"
	"testing"

	"tally/blocks/stop"
	"tally/runtime/host"
	"tally/runtime/progress"
	"tally/runtime/result"
	"tally/runtime/watch"
)

// Attach feeds the hub from a real run: the point commits and the progress of the running
// point (a point held for a second by a time rule gets several progress calls, one every
// progress.Every), with the counts the progress line would print.
func TestAttachFollowsARun(t *testing.T) {
	if testing.Short() {
		t.Skip("a run of a second")
	}
	dir := t.TempDir()
	script := filepath.Join(dir, "held.go")
	os.WriteFile(script, []byte(`//go:build ignore

package main

import (
	"time"

	"tally/blocks/channel"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/source"
	"tally/blocks/stop"
	"tally/runtime/sim"
)

func main() {
	x := sim.New("held link")
	x.Sweep("ebn0_db", 2, 3)
	x.Link(func(p sim.Point) *link.Link {
		m := modem.BPSK()
		return link.Chain(source.Random(1024), m.Mod(), channel.AWGN(p.Get("ebn0_db")), m.Demod())
	})
	x.Stop(stop.Errors(1e9), stop.Time(600*time.Millisecond))
	x.Run()
}
`), 0o644)
	h := NewHub()
	var mu sync.Mutex
	var lives []Live
	points := 0
	// Hooks set before Attach are kept and called first: they count what the hub is given.
	cfg := watch.Config{Observe: func(file string, c *host.Config) {
		c.OnPoint = func(r *result.Run, total int) {
			mu.Lock()
			defer mu.Unlock()
			points++
			if total != 2 || len(r.Points) != points {
				t.Errorf("commit %d: %d points of %d", points, len(r.Points), total)
			}
		}
		c.OnProgress = func(p progress.Point, pr *stop.Progress) {
			mu.Lock()
			defer mu.Unlock()
			lives = append(lives, LiveOf(p, pr))
		}
	}}
	h.Attach(&cfg)
	c := host.Config{Quiet: true, Workers: 1}
	cfg.OnEvent(watch.Event{Kind: watch.Watching, File: script})
	cfg.Observe(script, &c)
	cfg.OnEvent(watch.Event{Kind: watch.Started, File: script})
	if err := host.Run(context.Background(), script, c); err != nil {
		t.Fatal(err)
	}
	h.mu.Lock()
	v := h.exps[script]
	h.mu.Unlock()
	if points != 2 || v.Live == nil || len(v.Live.Points) != 2 || v.Status != Running {
		t.Fatalf("points committed %d, live run %+v", points, v.Live)
	}
	if len(lives) < 2 {
		t.Fatalf("%d progress calls in two points of 0.6 s each", len(lives))
	}
	starts := 0
	for _, l := range lives {
		if l.Bits == 0 {
			// Told as each point starts, before its first frame: no rate or estimate yet.
			starts++
			if l.Goal != 1e9 || l.Total != 2 || !math.IsNaN(l.BER) {
				t.Errorf("start of a point told %+v", l)
			}
			continue
		}
		// Errors(1e9) is the goal, no bit cap; the time rule projects the time left.
		if l.Goal != 1e9 || l.Cap != 0 || l.Bits <= 0 || l.Rate <= 0 || l.Left < 0 || l.Total != 2 ||
			!(l.Low <= l.BER && l.BER <= l.High) {
			t.Errorf("progress %+v", l)
		}
	}
	if starts != 2 {
		t.Errorf("%d of 2 points told as they start", starts)
	}
}
