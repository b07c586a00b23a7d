package page

import (
	"context"
	"fmt"
	"net"
	"net/http/httptest"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"
	"time"

	"tally/runtime/host"
	"tally/runtime/page/internal/cdp"
	"tally/runtime/watch"
)

// experiment is a small BPSK sweep with theory and a target, quick enough for a test; seed
// and the last Eb/N0 vary between saves.
func experiment(seed, last int) string {
	return fmt.Sprintf(`//go:build ignore

package main

import (
	"tally/blocks/channel"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/source"
	"tally/blocks/stop"
	"tally/blocks/theory"
	"tally/runtime/sim"
)

func main() {
	x := sim.New("Test bench link: BPSK over AWGN")
	x.Sweep("ebn0_db", sim.Range(0, %d, 1)...)
	x.Seed(%d)
	x.Link(func(p sim.Point) *link.Link {
		m := modem.BPSK()
		return link.Chain(source.Random(1024), m.Mod(), channel.AWGN(p.Get("ebn0_db")), m.Demod())
	})
	x.Stop(stop.Errors(40), stop.Bits(4e5))
	x.Theory("coherent", func(p sim.Point) float64 { return theory.BPSK(p.Get("ebn0_db")) })
	x.Target(1e-2, "coherent")
	x.Run()
}
`, last, seed)
}

// broken is the experiment with a mistake: an undefined name at line 18, column 9.
func broken() string {
	return strings.Replace(experiment(1, 6), "\tx.Seed(1)\n", "\tx.Seed(oops)\n", 1)
}

// browser starts headless Chromium for a test, or skips the test with the reason when none
// can be found. TALLY_REQUIRE_BROWSER=1 (set by .ci/run once it installed one) makes a
// missing browser a failure, so the test never passes by skipping where it should run.
func browser(t testing.TB) (*cdp.Browser, *cdp.Page) {
	t.Helper()
	path, err := cdp.Find()
	if err != nil {
		if os.Getenv("TALLY_REQUIRE_BROWSER") == "1" {
			t.Fatalf("browser test: %v", err)
		}
		t.Skipf("SKIP browser test: %v", err)
	}
	b, err := cdp.Start(path, 1280, 900)
	if err != nil {
		t.Fatalf("browser test: %v", err)
	}
	t.Cleanup(b.Close)
	p, err := b.Page()
	if err != nil {
		t.Fatalf("browser test: %v\n%s", err, b.Logs())
	}
	t.Cleanup(func() { p.Close() })
	return b, p
}

// session is a watcher with its page, stopped by stop or at the end of the test.
type session struct {
	cancel context.CancelFunc
	done   sync.WaitGroup
	events chan watch.Event
	url    string
}

func watchWithPage(t testing.TB, addr string, paths ...string) *session {
	t.Helper()
	l, err := Listen(addr)
	if err != nil {
		t.Fatal(err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	s := &session{cancel: cancel, events: make(chan watch.Event, 1000), url: URL(l)}
	cfg := watch.Config{Host: host.Config{Quiet: true, Workers: 1}, Out: &strings.Builder{},
		OnEvent: func(e watch.Event) { s.events <- e }}
	hub := NewHub()
	hub.Attach(&cfg)
	s.done.Add(2)
	go func() { defer s.done.Done(); Serve(ctx, l, hub) }()
	go func() {
		defer s.done.Done()
		if err := watch.Run(ctx, paths, cfg); err != nil {
			t.Errorf("watch: %v", err)
		}
	}()
	t.Cleanup(s.stop)
	return s
}

func (s *session) stop() {
	s.cancel()
	s.done.Wait()
}

func (s *session) wait(t testing.TB, kind watch.Kind) watch.Event {
	t.Helper()
	deadline := time.After(120 * time.Second)
	for {
		select {
		case e := <-s.events:
			if e.Kind == kind {
				return e
			}
		case <-deadline:
			t.Fatalf("no watch event %d in time", kind)
		}
	}
}

// shot saves a screenshot where the test's artifacts go ($TALLY_ARTIFACTS, else the test's
// temporary folder) and says where.
func shot(t testing.TB, p *cdp.Page, name string, maxH int) string {
	t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), 30*time.Second)
	defer cancel()
	png, err := p.Screenshot(ctx, 1280, maxH)
	if err != nil {
		t.Fatalf("screenshot: %v", err)
	}
	dir := os.Getenv("TALLY_ARTIFACTS")
	if dir == "" {
		dir = t.TempDir()
	}
	path := filepath.Join(dir, name)
	if err := os.WriteFile(path, png, 0o644); err != nil {
		t.Fatal(err)
	}
	t.Logf("screenshot: %s", path)
	return path
}

// The page in a real browser: plot and table drawn from the first run; a changed save shows
// as a new run at once and fills in without a reload; a broken save shows the error at its
// file:line:col above the last good results, marked stale; the page reconnects by itself
// when the watcher restarts.
func TestBrowser(t *testing.T) {
	if testing.Short() {
		t.Skip("SKIP browser test in -short mode")
	}
	began := time.Now()
	_, p := browser(t)
	dir := t.TempDir()
	script := filepath.Join(dir, "bench.go")
	os.WriteFile(script, []byte(experiment(1, 6)), 0o644)
	// A fixed free port, so that the restarted watcher is found at the same address.
	l, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		t.Fatal(err)
	}
	addr := l.Addr().String()
	l.Close()
	s := watchWithPage(t, addr, dir)
	s.wait(t, watch.Finished)

	ctx, cancel := context.WithTimeout(context.Background(), 90*time.Second)
	defer cancel()
	if err := p.Navigate(ctx, s.url); err != nil {
		t.Fatal(err)
	}
	sec := `document.getElementById("exp-bench")`
	must := func(what, expr string, limit time.Duration) {
		t.Helper()
		c, stop := context.WithTimeout(ctx, limit)
		defer stop()
		if err := p.WaitFor(c, expr); err != nil {
			var html string
			p.Eval(ctx, `document.body.innerText.slice(0, 3000)`, &html)
			t.Fatalf("%s: %v\nscript errors: %q\npage text:\n%s", what, err, p.Errors(), html)
		}
	}
	// 7 points (Eb/N0 0…6): 7 markers, 7 table rows, theory drawn, a crossing found.
	must("the first run drawn", sec+` && `+sec+`.dataset.status === "finished" && `+sec+`.querySelector(".plot > svg").dataset.n === "7"`, 20*time.Second)
	var got struct {
		Rows     int    `json:"rows"`
		Theory   int    `json:"theory"`
		Crossing string `json:"crossing"`
		Conn     string `json:"conn"`
	}
	p.Eval(ctx, `(() => { const s = `+sec+`; return {
		rows: s.querySelectorAll(".table tbody tr").length,
		theory: s.querySelectorAll(".plot path[stroke-dasharray]").length,
		crossing: s.querySelector(".crossbox").innerText,
		conn: document.getElementById("conn").dataset.state }; })()`, &got)
	if got.Rows != 7 || got.Theory < 1 || !strings.Contains(got.Crossing, "ebn0_db = ") || got.Conn != "live" {
		t.Errorf("first run: %+v", got)
	}
	// The hover text of a point names its counts, interval, stop reason and theory.
	var tipText string
	err = p.Eval(ctx, `(() => { const svg = `+sec+`.querySelector(".plot > svg");
		const pts = window.tallyPage.hover.get("bench"), q = pts[2];
		const at = new DOMPoint(q.x, q.y).matrixTransform(svg.getScreenCTM());
		svg.dispatchEvent(new MouseEvent("mousemove", {bubbles: true, clientX: at.x + 2, clientY: at.y + 1}));
		return document.getElementById("tip").innerText; })()`, &tipText)
	for _, want := range []string{"ebn0_db=2", "errors in", "95 % interval", "stopped by", "theory coherent"} {
		if err != nil || !strings.Contains(tipText, want) {
			t.Errorf("hover text lacks %q: %q (%v)", want, tipText, err)
		}
	}
	shot(t, p, "page-finished.png", 0)

	// A changed save: the page says "running" for run 2 within a few seconds, without a
	// reload (a mark left in the page survives), then draws the 9 new points.
	p.Eval(ctx, `window.leftByTheTest = 42`, nil)
	os.WriteFile(script, []byte(experiment(2, 8)), 0o644)
	must("the new run shown as running", sec+`.dataset.seq === "2" && `+sec+`.dataset.status === "running"`, 5*time.Second)
	must("the new run drawn", sec+`.dataset.seq === "2" && `+sec+`.dataset.status === "finished" && `+sec+`.querySelectorAll(".table tbody tr").length === 9`, 60*time.Second)
	var mark int
	if p.Eval(ctx, `window.leftByTheTest`, &mark); mark != 42 {
		t.Error("the page reloaded instead of updating in place")
	}
	var changed string
	p.Eval(ctx, sec+`.querySelector(".changed").innerText`, &changed)
	if !strings.Contains(changed, "ber") {
		t.Errorf("no what-changed report: %q", changed)
	}

	p.Eval(ctx, `document.getElementById("tip").hidden = true`, nil)
	// A broken save: the error at its position, the last good results beneath it, stale.
	os.WriteFile(script, []byte(broken()), 0o644)
	must("the error shown", sec+`.dataset.status === "failed" && `+sec+`.dataset.stale === "yes"`, 30*time.Second)
	var fault struct {
		Where string `json:"where"`
		Msg   string `json:"msg"`
		Stale bool   `json:"stale"`
		Rows  int    `json:"rows"`
	}
	p.Eval(ctx, `(() => { const s = `+sec+`; return {
		where: s.querySelector(".fault .where").innerText,
		msg: s.querySelector(".fault .msg").innerText,
		stale: s.querySelector(".stalebox").classList.contains("stale") && s.querySelector(".stalemark").offsetHeight > 0,
		rows: s.querySelectorAll(".table tbody tr").length }; })()`, &fault)
	if !strings.HasSuffix(fault.Where, "bench.go:18:9") || !strings.Contains(fault.Msg, "oops") || !fault.Stale || fault.Rows != 9 {
		t.Errorf("broken save: %+v", fault)
	}
	shot(t, p, "page-error.png", 0)

	// The watcher stops: the page says so; it starts again at the same address: the page
	// reconnects by itself and shows the experiment again.
	s.stop()
	must("the lost connection shown", `document.getElementById("conn").dataset.state === "lost"`, 10*time.Second)
	os.WriteFile(script, []byte(experiment(3, 6)), 0o644)
	s2 := watchWithPage(t, addr, dir)
	defer s2.stop()
	must("reconnected", `document.getElementById("conn").dataset.state === "live" && `+sec+` && `+sec+`.dataset.status === "finished" && `+sec+`.querySelectorAll(".table tbody tr").length === 7`, 60*time.Second)
	if errs := p.Errors(); len(errs) > 0 {
		t.Errorf("the page's script threw: %q", errs)
	}
	t.Logf("browser test took %s", time.Since(began).Round(time.Millisecond))
}

// The progress bar of a running point: errors toward the goal fill it, the words give the
// counts, rate and time left; the point's commit replaces it.
func TestBrowserProgress(t *testing.T) {
	if testing.Short() {
		t.Skip("SKIP browser test in -short mode")
	}
	_, p := browser(t)
	h := NewHub()
	f := filepath.Join(t.TempDir(), "bar.go")
	h.RunStarted(f)
	srv := httptest.NewServer(Handler(h, true))
	defer srv.Close()
	defer h.Close()
	ctx, cancel := context.WithTimeout(context.Background(), 60*time.Second)
	defer cancel()
	if err := p.Navigate(ctx, srv.URL+"/"); err != nil {
		t.Fatal(err)
	}
	sec := `document.getElementById("exp-bar")`
	if err := p.WaitFor(ctx, sec+` && `+sec+`.dataset.status === "running"`); err != nil {
		t.Fatal(err)
	}
	h.Progress(f, Live{Label: "ebn0_db=4", Index: 2, Total: 6, Errors: 57, Goal: 100, Bits: 1230000, Cap: 10000000,
		Rate: 38.1e6, Left: 2.1, BER: 4.63e-5, Low: 3.5e-5, High: 6e-5})
	if err := p.WaitFor(ctx, sec+`.querySelector(".bar .fill")`); err != nil {
		t.Fatal(err)
	}
	var bar struct {
		Words string `json:"words"`
		Width string `json:"width"`
	}
	p.Eval(ctx, `({words: `+sec+`.querySelector(".bar .words").innerText, width: `+sec+`.querySelector(".bar .fill").style.width})`, &bar)
	for _, want := range []string{"[3/6] ebn0_db=4", "errors 57/100", "bits 1.23M/10M", "38.1 Mbit/s", "~2.1 s left"} {
		if !strings.Contains(bar.Words, want) {
			t.Errorf("progress words lack %q: %q", want, bar.Words)
		}
	}
	// 57 of 100 errors is further along than 1.23M of 10M bits: the bar shows 57 %.
	if bar.Width != "57%" && bar.Width != "57.0%" {
		t.Errorf("bar width %q, want 57 %%", bar.Width)
	}
	full := syntheticRun("bar", 6)
	for n := 1; n <= 3; n++ {
		run := *full
		run.Points = full.Points[:n]
		h.PointCommitted(f, &run, 6)
	}
	if err := p.WaitFor(ctx, sec+`.dataset.points === "3" && !`+sec+`.querySelector(".bar") && `+sec+`.querySelector(".bars .note")`); err != nil {
		t.Fatal(err)
	}
}
