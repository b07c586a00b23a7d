package page

import (
	"context"
	"net/http/httptest"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"tally/runtime/result"
)

// The page in a real browser opens on the tap the run shows (run.json's "shown": here the
// script's payload tap, which its stop rule judges), heads its table with that tap's trials,
// leaves a skipped point's cells empty instead of a measured 0 of 0, and words the progress
// bar on the governing tap.
func TestBrowserShownTap(t *testing.T) {
	if testing.Short() {
		t.Skip("SKIP browser test in -short mode")
	}
	_, p := browser(t)
	h := NewHub()
	f := filepath.Join(t.TempDir(), "burst.go")
	h.RunStarted(f)
	srv := httptest.NewServer(Handler(h, true))
	defer srv.Close()
	defer h.Close()
	ctx, cancel := context.WithTimeout(context.Background(), 60*time.Second)
	defer cancel()
	if err := p.Navigate(ctx, srv.URL+"/"); err != nil {
		t.Fatal(err)
	}
	sec := `document.getElementById("exp-burst")`
	if err := p.WaitFor(ctx, sec+` && `+sec+`.dataset.status === "running"`); err != nil {
		t.Fatal(err)
	}
	h.Progress(f, Live{Label: "ebn0_db=4", Index: 1, Total: 3, Tap: "payload", Errors: 40, Goal: 100, Bits: 20480, Cap: 1e6,
		Rate: 1e6, Left: 2, BER: 2e-3, Low: 1.5e-3, High: 2.8e-3})
	if err := p.WaitFor(ctx, sec+`.querySelector(".bar .words")`); err != nil {
		t.Fatal(err)
	}
	var words string
	p.Eval(ctx, sec+`.querySelector(".bar .words").innerText`, &words)
	if !strings.Contains(words, "payload errors 40/100") || !strings.Contains(words, "payload 2e-3") {
		t.Errorf("progress words %q: want the payload tap's errors and estimate", words)
	}
	r := &result.Run{Name: "burst", Script: "burst.go", Seed: 1, Confidence: 0.95, Method: "clopper-pearson",
		Params: []string{"ebn0_db"}, Taps: []string{"ber", "fer", "payload"}, Shown: []string{"payload"}}
	for i, e := range []int64{300, 90} {
		r.Points = append(r.Points, result.Point{Values: []float64{float64(2 * i)}, Stop: "payload_errors", Taps: []result.Tap{
			{Name: "ber", Trials: 20480, Errors: e + 30, Rate: float64(e+30) / 20480, Low: 0.001, High: 0.03},
			{Name: "fer", Trials: 10, Errors: 10, Rate: 1, Low: 0.7, High: 1},
			{Name: "payload", Trials: 19200, Errors: e, Rate: float64(e) / 19200, Low: 0.001, High: 0.03}}})
	}
	r.Points = append(r.Points, result.Point{Values: []float64{4}, Stop: "skipped", Note: "over the budget", Taps: []result.Tap{
		{Name: "ber", High: 1}, {Name: "fer", High: 1}, {Name: "payload", High: 1}}})
	h.RunFinished(f, r, nil, time.Second)
	if err := p.WaitFor(ctx, sec+`.dataset.status === "finished" && `+sec+`.querySelectorAll(".table tbody tr").length === 3`); err != nil {
		t.Fatal(err)
	}
	var got struct {
		Head    string `json:"head"`
		Skipped string `json:"skipped"`
		Pressed string `json:"pressed"`
	}
	p.Eval(ctx, `(() => { const s = `+sec+`; const rows = s.querySelectorAll(".table tbody tr"); return {
		head: s.querySelector(".table thead").innerText,
		skipped: Array.from(rows[2].querySelectorAll("td")).slice(1, 5).map(c => c.innerText).join("|"),
		pressed: (s.querySelector('.taps button[aria-pressed="true"]') || {}).innerText || "" }; })()`, &got)
	if !strings.Contains(got.Head, "trials") || !strings.Contains(got.Head, "PAYLOAD") || got.Pressed != "PAYLOAD" {
		t.Errorf("page opens on %q with head %q: want the payload tap", got.Pressed, got.Head)
	}
	if got.Skipped != "|||" {
		t.Errorf("skipped row cells %q, want empty", got.Skipped)
	}
	if errs := p.Errors(); len(errs) > 0 {
		t.Errorf("the page's script threw: %q", errs)
	}
}
