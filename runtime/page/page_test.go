package page

import (
	"bufio"
	"bytes"
	"encoding/json"
	"errors"
	"math"
	"net"
	"net/http"
	"net/http/httptest"
	"os"
	"path/filepath"
	"reflect"
	"regexp"
	"strings"
	"testing"
	"time"

	"tally/runtime/host"
	"tally/runtime/result"
)

// sampleRun is a small finished run, with the values a run really holds that encoding/json
// refuses: a theory curve with no value (NaN) and an infinite bound.
func sampleRun() *result.Run {
	return &result.Run{
		Name: "sample </script> link", Script: "sample.go", Mode: "interpreted", Seed: 7, Workers: 2,
		Confidence: 0.95, Method: "clopper-pearson", Params: []string{"ebn0_db", "modem"},
		Labels: [][]string{nil, {"BPSK", "QPSK"}}, Taps: []string{"ber", "fer"}, Theory: []string{"coherent"},
		Points: []result.Point{
			{Values: []float64{0, 0}, Frames: 3, Stop: "errors", Theory: []float64{0.0786}, Seconds: 0.01, BitRate: 1e6,
				Taps: []result.Tap{{Name: "ber", Trials: 1000, Errors: 80, Rate: 0.08, Low: 0.064, High: 0.098, Method: "stagewise"},
					{Name: "fer", Trials: 3, Errors: 3, Rate: 1, Low: 0.29, High: 1, Method: "clopper-pearson"}}},
			{Values: []float64{9, 1}, Frames: 100, Stop: "bits", Theory: []float64{math.NaN()}, Seconds: 0.5, BitRate: 2e6,
				Taps: []result.Tap{{Name: "ber", Trials: 100000, Errors: 0, Rate: 0, Low: 0, High: 3e-5, Method: "clopper-pearson"},
					{Name: "fer", Trials: 100, Errors: 0, Rate: 0, Low: 0, High: math.Inf(1), Method: "clopper-pearson", Absent: true}}},
		},
		Targets: []result.Target{{Tap: "ber", Rate: 1e-5, Found: false, Note: "not bracketed"}},
		Start:   time.Date(2026, 1, 2, 3, 4, 5, 0, time.UTC), End: time.Date(2026, 1, 2, 3, 4, 9, 0, time.UTC),
	}
}

// JSON writes what encoding/json writes (the reference: the standard library), read back to
// the same values, and writes the non-finite floats as the strings JavaScript's Number()
// reads ("NaN", "Infinity", "-Infinity", from the ECMAScript specification's
// StringToNumber).
func TestJSON(t *testing.T) {
	r := sampleRun()
	ours, err := JSON(r)
	if err != nil {
		t.Fatal(err)
	}
	// Against encoding/json on the same run with its non-finite values made finite.
	finite := sampleRun()
	finite.Points[1].Theory[0] = 0.5
	finite.Points[1].Taps[1].High = 1
	want, err := json.Marshal(finite)
	if err != nil {
		t.Fatal(err)
	}
	got, err := JSON(finite)
	if err != nil {
		t.Fatal(err)
	}
	var a, b any
	if err := json.Unmarshal(got, &a); err != nil {
		t.Fatalf("our JSON does not parse: %v\n%s", err, got)
	}
	json.Unmarshal(want, &b)
	if !reflect.DeepEqual(a, b) {
		t.Errorf("JSON differs from encoding/json:\nours %s\nstd  %s", got, want)
	}
	// The non-finite values.
	var back map[string]any
	if err := json.Unmarshal(ours, &back); err != nil {
		t.Fatalf("JSON with NaN does not parse: %v", err)
	}
	p1 := back["points"].([]any)[1].(map[string]any)
	if th := p1["theory"].([]any)[0]; th != "NaN" {
		t.Errorf("NaN written as %v", th)
	}
	if hi := p1["taps"].([]any)[1].(map[string]any)["ci_high"]; hi != "Infinity" {
		t.Errorf("+Inf written as %v", hi)
	}
	if neg, _ := JSON(math.Inf(-1)); string(neg) != `"-Infinity"` {
		t.Errorf("-Inf written as %s", neg)
	}
	// omitempty and "-" as encoding/json: the scatter is never written, an empty note never.
	if bytes.Contains(ours, []byte("Scatter")) || bytes.Contains(ours, []byte(`"note":""`)) {
		t.Errorf("tags not honoured: %s", ours)
	}
	// Strings escaped as encoding/json escapes them, so "</script>" cannot end a script element.
	if bytes.Contains(ours, []byte("</script>")) {
		t.Error("</script> left unescaped")
	}
}

// hubWith is a hub watching an experiment file in a fresh folder, with outputs beside it.
func hubWith(t *testing.T) (*Hub, string, string) {
	t.Helper()
	dir := t.TempDir()
	script := filepath.Join(dir, "link.go")
	os.WriteFile(script, []byte("//go:build ignore\n\npackage main\n"), 0o644)
	out := filepath.Join(dir, "link")
	os.Mkdir(out, 0o755)
	os.WriteFile(filepath.Join(out, "table.csv"), []byte("ebn0_db,bits\n0,1000\n"), 0o644)
	os.WriteFile(filepath.Join(out, "notes.txt"), []byte("PRIVATE-NOTES"), 0o644)
	os.WriteFile(filepath.Join(dir, "secret.txt"), []byte("SECRET-CONTENT"), 0o644)
	h := NewHub()
	h.Watch(script)
	return h, dir, out
}

func get(t *testing.T, srv http.Handler, method, path string) *httptest.ResponseRecorder {
	t.Helper()
	req := httptest.NewRequest(method, "http://127.0.0.1"+path, nil)
	w := httptest.NewRecorder()
	srv.ServeHTTP(w, req)
	return w
}

// The page serves the watched experiments' output files and nothing else: not a file of
// another name in the outputs folder, not a path that climbs out, not a link that leads
// out of the experiment's folder, not an experiment it does not watch.
func TestFilesRefused(t *testing.T) {
	h, dir, out := hubWith(t)
	srv := Handler(h, true)
	if w := get(t, srv, "GET", "/files/link/table.csv"); w.Code != 200 || !strings.Contains(w.Body.String(), "ebn0_db") {
		t.Fatalf("an output file: %d %q", w.Code, w.Body.String())
	}
	outside := filepath.Join(t.TempDir(), "elsewhere.csv")
	os.WriteFile(outside, []byte("ELSEWHERE-CONTENT"), 0o644)
	for _, c := range []struct{ what, path string }{
		{"an unknown file in the outputs folder", "/files/link/notes.txt"},
		{"a file that is not there", "/files/link/ber.png"},
		{"an experiment not watched", "/files/other/table.csv"},
		{"a climb out, escaped", "/files/link/..%2f..%2fsecret.txt"},
		{"a climb out, escaped twice", "/files/link/%252e%252e%252fsecret.txt"},
		{"a climb out by the id", "/files/..%2flink/table.csv"},
		{"a climb out, plain", "/files/link/../../secret.txt"},
		{"a backslash climb", `/files/link/..%5csecret.txt`},
		{"the folder itself", "/files/link/"},
		{"an unknown route", "/link/table.csv"},
		{"the source of the page", "/runtime/page/hub.go"},
	} {
		w := get(t, srv, "GET", c.path)
		body := w.Body.String()
		if w.Code == 200 || strings.Contains(body, "SECRET-CONTENT") || strings.Contains(body, "PRIVATE-NOTES") {
			t.Errorf("%s (%s): %d %q", c.what, c.path, w.Code, body)
		}
	}
	// A link to a file outside the experiment's folder, named like an output file.
	if err := os.Symlink(outside, filepath.Join(out, "run.json")); err != nil {
		t.Skip("no symbolic links here:", err)
	}
	if w := get(t, srv, "GET", "/files/link/run.json"); w.Code != http.StatusForbidden || strings.Contains(w.Body.String(), "ELSEWHERE") {
		t.Errorf("a link out of the folder: %d %q", w.Code, w.Body.String())
	}
	// The outputs folder itself a link out of the folder.
	os.RemoveAll(out)
	os.Symlink(filepath.Dir(outside), out)
	if w := get(t, srv, "GET", "/files/link/table.csv"); w.Code == 200 {
		t.Errorf("an outputs folder linked out: %d %q", w.Code, w.Body.String())
	}
	// A link inside the folder is fine.
	os.Remove(out)
	os.Mkdir(out, 0o755)
	os.WriteFile(filepath.Join(dir, "kept.csv"), []byte("inside"), 0o644)
	os.Symlink(filepath.Join(dir, "kept.csv"), filepath.Join(out, "table.csv"))
	if w := get(t, srv, "GET", "/files/link/table.csv"); w.Code != 200 || w.Body.String() != "inside" {
		t.Errorf("a link inside the folder: %d %q", w.Code, w.Body.String())
	}
}

// The page is read-only, and when bound to loopback answers only to loopback names (a name
// of an outside site pointed at 127.0.0.1 is refused).
func TestHandlerGuards(t *testing.T) {
	h, _, _ := hubWith(t)
	srv := Handler(h, true)
	for _, m := range []string{"POST", "PUT", "DELETE", "PATCH"} {
		if w := get(t, srv, m, "/"); w.Code != http.StatusMethodNotAllowed {
			t.Errorf("%s: %d", m, w.Code)
		}
	}
	req := httptest.NewRequest("GET", "http://rebound.example:8080/state", nil)
	w := httptest.NewRecorder()
	srv.ServeHTTP(w, req)
	if w.Code != http.StatusForbidden {
		t.Errorf("a foreign Host: %d", w.Code)
	}
	for _, hst := range []string{"localhost:1", "127.0.0.1:1", "[::1]:1", "127.0.0.2"} {
		req := httptest.NewRequest("GET", "http://x/state", nil)
		req.Host = hst
		w := httptest.NewRecorder()
		srv.ServeHTTP(w, req)
		if w.Code != 200 {
			t.Errorf("Host %s: %d", hst, w.Code)
		}
	}
	// Bound to another interface on purpose: any Host.
	req = httptest.NewRequest("GET", "http://lab-machine:8080/state", nil)
	w = httptest.NewRecorder()
	Handler(h, false).ServeHTTP(w, req)
	if w.Code != 200 {
		t.Errorf("a named interface: %d", w.Code)
	}
	// The page and its assets, from the binary; no address outside the page in them.
	for _, p := range []string{"/", "/assets/page.js", "/assets/page.css"} {
		w := get(t, srv, "GET", p)
		if w.Code != 200 || w.Body.Len() < 500 {
			t.Errorf("%s: %d, %d bytes", p, w.Code, w.Body.Len())
		}
		if m := regexp.MustCompile(`(?i)(https?:)?//[a-z0-9.-]+\.[a-z]{2,}`).FindString(w.Body.String()); m != "" {
			t.Errorf("%s refers outside the page: %q", p, m)
		}
	}
}

// Listen binds the loopback interface unless the address names a host, and port 0 picks one.
func TestListen(t *testing.T) {
	l, err := Listen(":0")
	if err != nil {
		t.Fatal(err)
	}
	defer l.Close()
	a := l.Addr().(*net.TCPAddr)
	if !a.IP.IsLoopback() || a.Port == 0 {
		t.Errorf("listening on %v", a)
	}
	if u := URL(l); !strings.HasPrefix(u, "http://127.0.0.1:") {
		t.Errorf("URL %q", u)
	}
	if _, err := Listen("8080"); err == nil || !strings.Contains(err.Error(), "host:port") {
		t.Errorf("a bare port: %v", err)
	}
}

// sse reads server-sent events (the format of the HTML standard, section 9.2) from a body.
type sse struct{ r *bufio.Reader }

func (s sse) next(t *testing.T) (string, string) {
	t.Helper()
	var event, data string
	for {
		line, err := s.r.ReadString('\n')
		if err != nil {
			t.Fatalf("event stream ended: %v", err)
		}
		line = strings.TrimRight(line, "\n")
		switch {
		case line == "" && data != "":
			return event, data
		case strings.HasPrefix(line, "event: "):
			event = line[len("event: "):]
		case strings.HasPrefix(line, "data: "):
			data += line[len("data: "):]
		}
	}
}

// The event stream: the whole state first, then each step of a run in order, every message
// valid JSON.
func TestEvents(t *testing.T) {
	h, _, _ := hubWith(t)
	srv := httptest.NewServer(Handler(h, true))
	defer srv.Close()
	resp, err := http.Get(srv.URL + "/events")
	if err != nil {
		t.Fatal(err)
	}
	defer resp.Body.Close()
	if ct := resp.Header.Get("Content-Type"); ct != "text/event-stream" {
		t.Fatalf("content type %q", ct)
	}
	s := sse{bufio.NewReader(resp.Body)}
	ev, data := s.next(t)
	var st struct {
		Exps []view `json:"exps"`
	}
	if ev != "state" || json.Unmarshal([]byte(data), &st) != nil || len(st.Exps) != 1 || st.Exps[0].Status != Waiting {
		t.Fatalf("first message %s %s", ev, data)
	}
	script := st.Exps[0].File
	h.RunStarted(script)
	run := sampleRun()
	run.Points = run.Points[:1]
	h.PointCommitted(script, run, 2)
	h.Progress(script, Live{Label: "ebn0_db=9 modem=QPSK", Index: 1, Total: 2, BER: math.NaN()})
	h.RunFailed(script, &host.ScriptError{Pos: "link.go:12:3", Msg: "undefined: oops"}, time.Second)
	want := []string{"exp", "point", "progress", "exp"}
	var last string
	for i, w := range want {
		ev, data := s.next(t)
		var v any
		if ev != w || json.Unmarshal([]byte(data), &v) != nil {
			t.Fatalf("message %d: %s %s, want %s", i, ev, data, w)
		}
		last = data
	}
	var failed view
	json.Unmarshal([]byte(last), &failed)
	if failed.Status != Failed || failed.Error == nil || failed.Error.Pos != "link.go:12:3" || failed.Error.Msg != "undefined: oops" {
		t.Errorf("failure: %s", last)
	}
	// A run error that is not a script mistake keeps its words and has no position.
	if f := failure(errors.New("disk full")); f.Pos != "" || f.Msg != "disk full" {
		t.Errorf("run error: %+v", f)
	}
}

// A page that stops reading is dropped rather than let the hub's memory grow.
func TestSlowPageDropped(t *testing.T) {
	h := NewHub()
	_, ch := h.subscribe()
	for range 2000 {
		h.RunStarted("a.go")
	}
	n := 0
	for range ch {
		n++
	}
	if n == 0 || n >= 2000 {
		t.Errorf("a slow page got %d messages", n)
	}
}

// The snapshot is one file: styles and script inline, the data in it, nothing fetched.
func TestSnapshot(t *testing.T) {
	b, err := Snapshot([]*result.Run{sampleRun()}, []string{"sample.go"}, time.Date(2026, 1, 2, 3, 4, 5, 0, time.UTC))
	if err != nil {
		t.Fatal(err)
	}
	s := string(b)
	for _, bad := range []string{`src="`, `href="assets`, "http://", "https://"} {
		if strings.Contains(s, bad) {
			t.Errorf("the snapshot refers outside itself: %q", bad)
		}
	}
	i := strings.Index(s, `<script type="application/json" id="snapshot">`)
	if i < 0 {
		t.Fatal("no data in the snapshot")
	}
	rest := s[i+len(`<script type="application/json" id="snapshot">`):]
	data := rest[:strings.Index(rest, "</script>")]
	var st struct {
		Exps     []map[string]any `json:"exps"`
		Snapshot int64            `json:"snapshot"`
	}
	if err := json.Unmarshal([]byte(data), &st); err != nil {
		t.Fatalf("snapshot data: %v", err)
	}
	if len(st.Exps) != 1 || st.Exps[0]["status"] != Done || st.Snapshot == 0 {
		t.Errorf("snapshot data: %+v", st)
	}
	if !strings.Contains(s, "<style>") || !strings.Contains(s, "function plot(") {
		t.Error("styles or script not inline")
	}
}

// The results on disk beside a script are shown until its first run ends, theory gaps kept.
func TestOnDisk(t *testing.T) {
	dir := t.TempDir()
	script := filepath.Join(dir, "x.go")
	os.Mkdir(filepath.Join(dir, "x"), 0o755)
	rec := `{"name":"x","params":["ebn0_db"],"taps":["ber"],"theory":["t"],"points":[{"values":[1],"theory":[null],"taps":[{"name":"ber","trials":10,"errors":1}]}]}`
	os.WriteFile(filepath.Join(dir, "x", "run.json"), []byte(rec), 0o644)
	r := onDisk(script)
	if r == nil || len(r.Points) != 1 || !math.IsNaN(r.Points[0].Theory[0]) {
		t.Fatalf("run on disk: %+v", r)
	}
	if onDisk(filepath.Join(dir, "none.go")) != nil {
		t.Error("a run where there is none")
	}
}
