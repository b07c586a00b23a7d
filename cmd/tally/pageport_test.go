package main

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"tally/blocks/link"
	"tally/blocks/stop"
	"tally/runtime/host"
	"tally/runtime/isolate"
	"tally/runtime/progress"
	"tally/runtime/result"
)

// follow records what a run's OnPoint and OnProgress were told.
type follow struct {
	points   []string // per OnPoint: points so far / total, the last one's stop and counts
	progress []string // per OnProgress: point, goals, and the BER prefix
}

func (f *follow) hook(c *host.Config) {
	c.OnPoint = func(r *result.Run, total int) {
		last := r.Points[len(r.Points)-1]
		f.points = append(f.points, fmt.Sprintf("%d/%d %s %d frames", len(r.Points), total, last.Stop, last.Frames))
	}
	c.OnProgress = func(p progress.Point, pr *stop.Progress) {
		errs, bits := progress.Goals(p.Rules)
		ber, _ := pr.Tap(link.TapBER)
		f.progress = append(f.progress, fmt.Sprintf("%s [%d/%d] goal %d errors, %d bits; %d/%d", p.Label, p.Index+1, p.Total, errs, bits, ber.Errors, ber.Trials))
	}
}

// A run in its child process tells the parent's OnPoint and OnProgress what the same run in
// this process tells them: each point with the sweep's size (the skipped one too), and the
// running point's progress with its goals (a page's progress bar).
func TestIsolatedFollow(t *testing.T) {
	dir := t.TempDir()
	exp := filepath.Join(dir, "follow.go")
	os.WriteFile(exp, []byte(`//go:build ignore

package main

import (
	"tally/blocks/channel"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/source"
	"tally/blocks/stop"
	"tally/runtime/sim"
)

func main() {
	x := sim.New("followed link")
	x.Sweep("ebn0_db", 0, 12, 40)
	x.Link(func(p sim.Point) *link.Link {
		m := modem.BPSK()
		return link.Chain(source.Random(512), m.Mod(), channel.AWGN(p.Get("ebn0_db")), m.Demod())
	})
	x.Stop(stop.Errors(40), stop.Bits(1e8))
	x.StopSweep(stop.Floor(1e-4))
	x.Run()
}
`), 0o644)
	var in, out follow
	c := host.Config{Quiet: true, Workers: 2}
	in.hook(&c)
	if err := host.Run(context.Background(), exp, c); err != nil {
		t.Fatal(err)
	}
	c = host.Config{Quiet: true, Workers: 2}
	out.hook(&c)
	if err := isolate.Run(context.Background(), exp, isolate.Config{Host: c}); err != nil {
		t.Fatal(err)
	}
	if strings.Join(out.points, "\n") != strings.Join(in.points, "\n") {
		t.Errorf("OnPoint in the parent:\n%s\nin process:\n%s", strings.Join(out.points, "\n"), strings.Join(in.points, "\n"))
	}
	if len(in.points) != 3 || !strings.Contains(in.points[2], "skipped") {
		t.Errorf("the sweep's points: %q (want 3, the last skipped)", in.points)
	}
	// How often progress comes depends on the clock (every progress.Every, from the point's
	// start); the point at 12 dB runs its 1e8 bits without an error, far longer than that.
	for _, f := range []follow{in, out} {
		seen := map[string]bool{}
		for _, p := range f.progress {
			if !strings.Contains(p, "goal 40 errors, 100000000 bits") {
				t.Errorf("progress %q: wrong goals", p)
			}
			seen[p[:strings.Index(p, "]")+1]] = true
		}
		if !seen["ebn0_db=12 [2/3]"] || seen["ebn0_db=40 [3/3]"] {
			t.Errorf("progress reported for %v, want the point at 12 dB and not the skipped one", seen)
		}
	}
}
