package page

import (
	"tally/blocks/stop"
	"tally/runtime/host"
	"tally/runtime/progress"
	"tally/runtime/result"
	"tally/runtime/watch"
)

// Attach feeds h from a watcher's configuration: its events, and the points and progress of
// each run. Hooks already in cfg are kept and called first.
func (h *Hub) Attach(cfg *watch.Config) {
	onEvent := cfg.OnEvent
	cfg.OnEvent = func(e watch.Event) {
		if onEvent != nil {
			onEvent(e)
		}
		switch e.Kind {
		case watch.Watching, watch.Added:
			h.Watch(e.File)
		case watch.Started:
			h.RunStarted(e.File)
		case watch.Finished:
			h.RunFinished(e.File, e.Run, e.Changes, e.Took)
		case watch.Failed:
			h.RunFailed(e.File, e.Err, e.Took)
		case watch.Cancelled:
			h.RunCancelled(e.File)
		case watch.Forgotten:
			h.Forget(e.File)
		}
	}
	observe := cfg.Observe
	cfg.Observe = func(file string, c *host.Config) {
		if observe != nil {
			observe(file, c)
		}
		onPoint, onProgress := c.OnPoint, c.OnProgress
		c.OnPoint = func(run *result.Run, total int) {
			if onPoint != nil {
				onPoint(run, total)
			}
			h.PointCommitted(file, run, total)
		}
		c.OnProgress = func(p progress.Point, pr *stop.Progress) {
			if onProgress != nil {
				onProgress(p, pr)
			}
			h.Progress(file, LiveOf(p, pr))
		}
	}
}
