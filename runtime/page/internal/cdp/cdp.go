// Package cdp drives a headless Chromium through its DevTools protocol (JSON over a
// WebSocket), for the page's browser tests: open a page, evaluate script in it, take a
// screenshot. It is a test helper, not part of tally.
package cdp

import (
	"bufio"
	"context"
	"encoding/base64"
	"encoding/json"
	"errors"
	"fmt"
	"net/http"
	"net/url"
	"os"
	"os/exec"
	"strings"
	"sync"
	"time"
)

// Find is the path of a Chromium executable: $TALLY_BROWSER, else the first of the usual
// names on $PATH; an error when there is none.
func Find() (string, error) {
	if p := os.Getenv("TALLY_BROWSER"); p != "" {
		return exec.LookPath(p)
	}
	for _, name := range []string{"chromium", "chromium-browser", "headless-shell"} {
		if p, err := exec.LookPath(name); err == nil {
			return p, nil
		}
	}
	return "", errors.New("no chromium on PATH (install Debian's chromium package, or set TALLY_BROWSER)")
}

// Browser is a running headless browser.
type Browser struct {
	cmd  *exec.Cmd
	dir  string
	http string // host:port of the DevTools endpoint
	logs *strings.Builder
	lm   sync.Mutex
}

// Start launches the browser at path with a fresh profile (removed by Close) and a window
// of w×h.
func Start(path string, w, h int) (*Browser, error) {
	dir, err := os.MkdirTemp("", "tally-browser-")
	if err != nil {
		return nil, err
	}
	args := []string{"--headless", "--disable-gpu", "--remote-debugging-port=0", "--user-data-dir=" + dir,
		"--no-first-run", "--no-default-browser-check", "--disable-extensions", "--disable-background-networking",
		"--disable-component-update", "--disable-sync", "--hide-scrollbars", "--mute-audio", "--disable-dev-shm-usage",
		fmt.Sprintf("--window-size=%d,%d", w, h), "about:blank"}
	if os.Geteuid() == 0 {
		// Chromium's own sandbox cannot run as root; the browser only loads a local test page.
		args = append([]string{"--no-sandbox"}, args...)
	}
	cmd := exec.Command(path, args...)
	ownGroup(cmd)
	stderr, err := cmd.StderrPipe()
	if err != nil {
		os.RemoveAll(dir)
		return nil, err
	}
	if err := cmd.Start(); err != nil {
		os.RemoveAll(dir)
		return nil, err
	}
	b := &Browser{cmd: cmd, dir: dir, logs: &strings.Builder{}}
	found := make(chan string, 1)
	go func() {
		sc := bufio.NewScanner(stderr)
		sc.Buffer(make([]byte, 1<<16), 1<<20)
		for sc.Scan() {
			line := sc.Text()
			b.lm.Lock()
			if b.logs.Len() < 1<<16 {
				b.logs.WriteString(line + "\n")
			}
			b.lm.Unlock()
			if i := strings.Index(line, "DevTools listening on "); i >= 0 {
				select {
				case found <- strings.TrimSpace(line[i+len("DevTools listening on "):]):
				default:
				}
			}
		}
		close(found)
	}()
	select {
	case ws, ok := <-found:
		if !ok {
			b.Close()
			return nil, fmt.Errorf("cdp: the browser ended before it listened:\n%s", b.Logs())
		}
		u, err := url.Parse(ws)
		if err != nil {
			b.Close()
			return nil, err
		}
		b.http = u.Host
	case <-time.After(60 * time.Second):
		b.Close()
		return nil, fmt.Errorf("cdp: the browser did not start in 60 s:\n%s", b.Logs())
	}
	return b, nil
}

// Logs is what the browser wrote to its standard error (the start of it).
func (b *Browser) Logs() string {
	b.lm.Lock()
	defer b.lm.Unlock()
	return b.logs.String()
}

// Close ends the browser (the processes this package started) and removes its profile.
func (b *Browser) Close() {
	kill(b.cmd)
	b.cmd.Wait()
	for range 20 {
		if os.RemoveAll(b.dir) == nil {
			return
		}
		time.Sleep(50 * time.Millisecond)
	}
}

// Page is one tab, driven over its own WebSocket.
type Page struct {
	ws      *conn
	mu      sync.Mutex
	next    int
	pending map[int]chan reply
	dead    error
	errs    []string // exceptions the page's scripts threw
}

type reply struct {
	Result json.RawMessage `json:"result"`
	Error  *struct {
		Code    int    `json:"code"`
		Message string `json:"message"`
	} `json:"error"`
}

// Page connects to the browser's first tab.
func (b *Browser) Page() (*Page, error) {
	resp, err := http.Get("http://" + b.http + "/json/list")
	if err != nil {
		return nil, err
	}
	defer resp.Body.Close()
	var targets []struct {
		Type string `json:"type"`
		WS   string `json:"webSocketDebuggerUrl"`
	}
	if err := json.NewDecoder(resp.Body).Decode(&targets); err != nil {
		return nil, err
	}
	for _, t := range targets {
		if t.Type == "page" && t.WS != "" {
			ws, err := dial(t.WS)
			if err != nil {
				return nil, err
			}
			p := &Page{ws: ws, pending: map[int]chan reply{}}
			go p.loop()
			ctx, cancel := context.WithTimeout(context.Background(), 30*time.Second)
			defer cancel()
			if err := p.Call(ctx, "Runtime.enable", nil, nil); err != nil {
				p.Close()
				return nil, err
			}
			return p, nil
		}
	}
	return nil, errors.New("cdp: the browser has no page")
}

func (p *Page) loop() {
	for {
		m, err := p.ws.read()
		if err != nil {
			p.mu.Lock()
			p.dead = err
			for id, ch := range p.pending {
				close(ch)
				delete(p.pending, id)
			}
			p.mu.Unlock()
			return
		}
		var head struct {
			ID     int    `json:"id"`
			Method string `json:"method"`
			Params struct {
				Details struct {
					Text      string `json:"text"`
					Line      int    `json:"lineNumber"`
					Exception struct {
						Description string `json:"description"`
					} `json:"exception"`
				} `json:"exceptionDetails"`
			} `json:"params"`
		}
		if json.Unmarshal(m, &head) != nil || head.ID == 0 {
			if head.Method == "Runtime.exceptionThrown" {
				d := head.Params.Details
				p.mu.Lock()
				p.errs = append(p.errs, fmt.Sprintf("line %d: %s %s", d.Line+1, d.Text, d.Exception.Description))
				p.mu.Unlock()
			}
			continue
		}
		var r reply
		json.Unmarshal(m, &r)
		p.mu.Lock()
		ch := p.pending[head.ID]
		delete(p.pending, head.ID)
		p.mu.Unlock()
		if ch != nil {
			ch <- r
		}
	}
}

// Call sends one protocol command and decodes its result into out (if not nil).
func (p *Page) Call(ctx context.Context, method string, params, out any) error {
	p.mu.Lock()
	if p.dead != nil {
		p.mu.Unlock()
		return fmt.Errorf("cdp: connection lost: %w", p.dead)
	}
	p.next++
	id := p.next
	ch := make(chan reply, 1)
	p.pending[id] = ch
	p.mu.Unlock()
	if params == nil {
		params = struct{}{}
	}
	msg, err := json.Marshal(map[string]any{"id": id, "method": method, "params": params})
	if err != nil {
		return err
	}
	if err := p.ws.send(msg); err != nil {
		return err
	}
	select {
	case r, ok := <-ch:
		if !ok {
			return errors.New("cdp: connection lost")
		}
		if r.Error != nil {
			return fmt.Errorf("cdp: %s: %s", method, r.Error.Message)
		}
		if out != nil {
			return json.Unmarshal(r.Result, out)
		}
		return nil
	case <-ctx.Done():
		p.mu.Lock()
		delete(p.pending, id)
		p.mu.Unlock()
		return fmt.Errorf("cdp: %s: %w", method, ctx.Err())
	}
}

// Navigate opens url in the page.
func (p *Page) Navigate(ctx context.Context, url string) error {
	var r struct {
		ErrorText string `json:"errorText"`
	}
	if err := p.Call(ctx, "Page.navigate", map[string]any{"url": url}, &r); err != nil {
		return err
	}
	if r.ErrorText != "" {
		return fmt.Errorf("cdp: navigate %s: %s", url, r.ErrorText)
	}
	return nil
}

// Eval evaluates a JavaScript expression in the page (awaiting it, if it is a promise) and
// decodes its value into out.
func (p *Page) Eval(ctx context.Context, expr string, out any) error {
	var r struct {
		Result struct {
			Value json.RawMessage `json:"value"`
		} `json:"result"`
		Exception *struct {
			Text      string `json:"text"`
			Exception struct {
				Description string `json:"description"`
			} `json:"exception"`
		} `json:"exceptionDetails"`
	}
	err := p.Call(ctx, "Runtime.evaluate", map[string]any{"expression": expr, "returnByValue": true, "awaitPromise": true}, &r)
	if err != nil {
		return err
	}
	if r.Exception != nil {
		return fmt.Errorf("cdp: script failed: %s %s", r.Exception.Text, r.Exception.Exception.Description)
	}
	if out == nil || len(r.Result.Value) == 0 {
		return nil
	}
	return json.Unmarshal(r.Result.Value, out)
}

// WaitFor evaluates a boolean expression until it is true or ctx ends.
func (p *Page) WaitFor(ctx context.Context, expr string) error {
	for {
		var ok bool
		if err := p.Eval(ctx, "Boolean("+expr+")", &ok); err != nil {
			return err
		}
		if ok {
			return nil
		}
		select {
		case <-ctx.Done():
			return fmt.Errorf("cdp: waiting for %s: %w", expr, ctx.Err())
		case <-time.After(25 * time.Millisecond):
		}
	}
}

// Screenshot is a PNG of the page, w pixels wide and as tall as the page, up to maxH
// pixels (0: no limit).
func (p *Page) Screenshot(ctx context.Context, w, maxH int) ([]byte, error) {
	var h float64
	if err := p.Eval(ctx, "document.documentElement.scrollHeight", &h); err != nil {
		return nil, err
	}
	if maxH > 0 && h > float64(maxH) {
		h = float64(maxH)
	}
	if err := p.Call(ctx, "Emulation.setDeviceMetricsOverride", map[string]any{"width": w, "height": int(h), "deviceScaleFactor": 1, "mobile": false}, nil); err != nil {
		return nil, err
	}
	var r struct {
		Data string `json:"data"`
	}
	if err := p.Call(ctx, "Page.captureScreenshot", map[string]any{"format": "png"}, &r); err != nil {
		return nil, err
	}
	return base64.StdEncoding.DecodeString(r.Data)
}

// Errors are the exceptions the page's scripts threw and did not catch.
func (p *Page) Errors() []string {
	p.mu.Lock()
	defer p.mu.Unlock()
	return append([]string(nil), p.errs...)
}

// Close ends the page's connection.
func (p *Page) Close() error { return p.ws.close() }
