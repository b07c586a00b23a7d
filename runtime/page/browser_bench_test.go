package page

import (
	"context"
	"fmt"
	"math"
	"net/http/httptest"
	"os"
	"path/filepath"
	"testing"
	"time"

	"tally/blocks/theory"
	"tally/runtime/page/internal/cdp"
	"tally/runtime/result"
	"tally/runtime/watch"
)

// arm installs in the page a promise that resolves as soon as cond holds after a change of
// the page (a MutationObserver, so no polling delay is measured); settle awaits it.
func arm(ctx context.Context, p *cdp.Page, cond string) error {
	return p.Eval(ctx, `window.benchDone = new Promise(res => {
		const ok = () => { try { return Boolean(`+cond+`); } catch (e) { return false; } };
		if (ok()) { res(0); return; }
		const mo = new MutationObserver(() => { if (ok()) { mo.disconnect(); res(1); } });
		mo.observe(document.body, {subtree: true, childList: true, attributes: true, characterData: true});
	}); 0`, nil)
}

func settle(ctx context.Context, p *cdp.Page) error { return p.Eval(ctx, `window.benchDone`, nil) }

// Save → the page shows the new run as running (target ≤ 200 ms): the watcher's debounce, the
// event and the redraw, measured from the write of the file to the page's change.
func BenchmarkSaveToRunning(b *testing.B) {
	_, p := browser(b)
	dir := b.TempDir()
	script := filepath.Join(dir, "bench.go")
	os.WriteFile(script, []byte(experiment(1, 4)), 0o644)
	s := watchWithPage(b, "127.0.0.1:0", dir)
	s.wait(b, watch.Finished)
	ctx, cancel := context.WithTimeout(context.Background(), 10*time.Minute)
	defer cancel()
	if err := p.Navigate(ctx, s.url); err != nil {
		b.Fatal(err)
	}
	sec := `document.getElementById("exp-bench")`
	if err := p.WaitFor(ctx, sec+` && `+sec+`.dataset.status === "finished"`); err != nil {
		b.Fatal(err)
	}
	var total time.Duration
	b.ResetTimer()
	for i := range b.N {
		seq := i + 2
		if err := arm(ctx, p, fmt.Sprintf(`%s.dataset.seq === "%d" && %s.dataset.status === "running"`, sec, seq, sec)); err != nil {
			b.Fatal(err)
		}
		t0 := time.Now()
		os.WriteFile(script, []byte(experiment(seq, 4)), 0o644)
		if err := settle(ctx, p); err != nil {
			b.Fatal(err)
		}
		total += time.Since(t0)
		b.StopTimer()
		if err := p.WaitFor(ctx, fmt.Sprintf(`%s.dataset.seq === "%d" && %s.dataset.status === "finished"`, sec, seq, sec)); err != nil {
			b.Fatal(err)
		}
		b.StartTimer()
	}
	b.ReportMetric(float64(total.Microseconds())/1e3/float64(b.N), "ms/save-to-running")
}

// syntheticRun is a run of n points on two curves, BPSK-like figures, for the page's load.
func syntheticRun(name string, n int) *result.Run {
	r := &result.Run{Name: name, Script: name + ".go", Mode: "interpreted", Seed: 1, Workers: 2, Confidence: 0.95,
		Method: "clopper-pearson", Params: []string{"ebn0_db", "code"}, Labels: [][]string{nil, {"none", "hamming"}},
		Taps: []string{"ber", "fer"}, Theory: []string{"coherent"}}
	per := n / 2
	for c := range 2 {
		for i := range per {
			x := 10 * float64(i) / float64(per)
			ber := theory.BPSK(x - 1.5*float64(c))
			bits := int64(math.Max(1e4, 100/ber))
			errs := int64(math.Round(ber * float64(bits)))
			r.Points = append(r.Points, result.Point{Values: []float64{x, float64(c)}, Frames: bits / 1024, Stop: "errors",
				Theory: []float64{theory.BPSK(x)}, Seconds: 0.1, BitRate: float64(bits) * 10,
				Taps: []result.Tap{{Name: "ber", Trials: bits, Errors: errs, Rate: ber, Low: ber * 0.8, High: ber * 1.2, Method: "stagewise"},
					{Name: "fer", Trials: bits / 1024, Errors: errs / 2, Rate: math.Min(1, ber*500), Low: ber * 400, High: math.Min(1, ber*600), Method: "clopper-pearson"}}})
		}
	}
	r.Targets = []result.Target{{Tap: "ber", Rate: 1e-5, Found: true, X: 9.6, Low: 9.5, High: 9.7, Against: "coherent", Penalty: 0.01, TheoryX: 9.59}}
	return r
}

// The page with 20 experiments of 500 points each: the time to load and draw it all, then
// from a point's commit to its marker on the page (target ≤ 200 ms) while all the others are
// shown, and a redraw of one experiment (switching its plot to another tap).
func BenchmarkTwentyBy500(b *testing.B) {
	_, p := browser(b)
	h := NewHub()
	dir := b.TempDir()
	for k := range 20 {
		f := filepath.Join(dir, fmt.Sprintf("exp%02d.go", k))
		h.RunStarted(f)
		h.RunFinished(f, syntheticRun(fmt.Sprintf("experiment %d", k), 500), nil, time.Second)
	}
	live := filepath.Join(dir, "exp00.go")
	srv := httptest.NewServer(Handler(h, true))
	defer srv.Close()
	defer h.Close()
	ctx, cancel := context.WithTimeout(context.Background(), 10*time.Minute)
	defer cancel()
	t0 := time.Now()
	if err := p.Navigate(ctx, srv.URL+"/"); err != nil {
		b.Fatal(err)
	}
	if err := p.WaitFor(ctx, `document.querySelectorAll("section.exp .plot > svg").length === 20 && window.tallyPage.flushMs > 0`); err != nil {
		b.Fatal(err)
	}
	load := time.Since(t0)

	// Redraw of one experiment: press its FER button.
	var redraw float64
	err := p.Eval(ctx, `(() => { const t = performance.now();
		document.querySelector("#exp-exp05 button[data-tap=fer]").click();
		return new Promise(res => requestAnimationFrame(() => res(performance.now() - t))); })()`, &redraw)
	if err != nil {
		b.Fatal(err)
	}

	full := syntheticRun("experiment 0", 500)
	sec := `document.getElementById("exp-exp00")`
	var total time.Duration
	n := 0
	b.ResetTimer()
	for range b.N {
		if n == 0 || n == len(full.Points) {
			b.StopTimer()
			h.RunStarted(live)
			if err := p.WaitFor(ctx, sec+`.dataset.status === "running" && `+sec+`.dataset.points === "0"`); err != nil {
				b.Fatal(err)
			}
			n = 0
			b.StartTimer()
		}
		n++
		if err := arm(ctx, p, fmt.Sprintf(`%s.dataset.points === "%d"`, sec, n)); err != nil {
			b.Fatal(err)
		}
		run := *full
		run.Points = full.Points[:n]
		t := time.Now()
		h.PointCommitted(live, &run, len(full.Points))
		if err := settle(ctx, p); err != nil {
			b.Fatal(err)
		}
		total += time.Since(t)
	}
	b.ReportMetric(float64(total.Microseconds())/1e3/float64(b.N), "ms/commit-to-marker")
	b.ReportMetric(float64(load.Milliseconds()), "ms-load-20x500")
	b.ReportMetric(redraw, "ms-redraw-500")
	if errs := p.Errors(); len(errs) > 0 {
		b.Errorf("the page's script threw: %q", errs)
	}
}

// Commit → marker with one small experiment on the page (target ≤ 200 ms).
func BenchmarkCommitToMarker(b *testing.B) {
	_, p := browser(b)
	h := NewHub()
	f := filepath.Join(b.TempDir(), "one.go")
	h.Watch(f)
	srv := httptest.NewServer(Handler(h, true))
	defer srv.Close()
	defer h.Close()
	ctx, cancel := context.WithTimeout(context.Background(), 10*time.Minute)
	defer cancel()
	if err := p.Navigate(ctx, srv.URL+"/"); err != nil {
		b.Fatal(err)
	}
	full := syntheticRun("one", 40)
	sec := `document.getElementById("exp-one")`
	if err := p.WaitFor(ctx, sec); err != nil {
		b.Fatal(err)
	}
	var total time.Duration
	n := 0
	b.ResetTimer()
	for range b.N {
		if n == 0 || n == len(full.Points) {
			b.StopTimer()
			h.RunStarted(f)
			if err := p.WaitFor(ctx, sec+`.dataset.status === "running" && `+sec+`.dataset.points === "0"`); err != nil {
				b.Fatal(err)
			}
			n = 0
			b.StartTimer()
		}
		n++
		if err := arm(ctx, p, fmt.Sprintf(`%s.dataset.points === "%d" && %s.querySelector(".plot > svg").dataset.n === "%d"`, sec, n, sec, n)); err != nil {
			b.Fatal(err)
		}
		run := *full
		run.Points = full.Points[:n]
		t := time.Now()
		h.PointCommitted(f, &run, len(full.Points))
		if err := settle(ctx, p); err != nil {
			b.Fatal(err)
		}
		total += time.Since(t)
	}
	b.ReportMetric(float64(total.Microseconds())/1e3/float64(b.N), "ms/commit-to-marker")
}
