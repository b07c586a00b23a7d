package page

import (
	"context"
	"embed"
	"errors"
	"fmt"
	"net"
	"net/http"
	"strings"
	"time"
)

//go:embed assets
var assets embed.FS

// asset is an embedded file; the names are fixed, so a missing one is a build mistake.
func asset(name string) []byte {
	b, err := assets.ReadFile("assets/" + name)
	if err != nil {
		panic("page: missing asset " + name)
	}
	return b
}

// Listen opens addr for the page: "host:port", where an empty host means the loopback
// interface (the page is for the person at this machine) and port 0 picks a free one.
func Listen(addr string) (net.Listener, error) {
	host, port, err := net.SplitHostPort(addr)
	if err != nil {
		return nil, fmt.Errorf("page: address %q: want host:port or :port", addr)
	}
	if host == "" {
		host = "127.0.0.1"
	}
	l, err := net.Listen("tcp", net.JoinHostPort(host, port))
	if err != nil {
		return nil, fmt.Errorf("page: cannot listen on %s: %w", net.JoinHostPort(host, port), unwrapNet(err))
	}
	return l, nil
}

func unwrapNet(err error) error {
	var oe *net.OpError
	if errors.As(err, &oe) && oe.Err != nil {
		return oe.Err
	}
	return err
}

// URL is the address to open in a browser for a listener.
func URL(l net.Listener) string {
	a, ok := l.Addr().(*net.TCPAddr)
	if !ok {
		return "http://" + l.Addr().String() + "/"
	}
	host := a.IP.String()
	if a.IP.IsUnspecified() {
		host = "localhost"
	}
	return "http://" + net.JoinHostPort(host, fmt.Sprint(a.Port)) + "/"
}

// Serve serves the hub's page on l until ctx ends, then ends the pages' event streams.
func Serve(ctx context.Context, l net.Listener, h *Hub) error {
	loopback := false
	if a, ok := l.Addr().(*net.TCPAddr); ok {
		loopback = a.IP.IsLoopback()
	}
	srv := &http.Server{Handler: Handler(h, loopback), ReadHeaderTimeout: 10 * time.Second}
	go func() {
		<-ctx.Done()
		h.Close()
		srv.Close()
	}()
	err := srv.Serve(l)
	if errors.Is(err, http.ErrServerClosed) {
		return nil
	}
	return err
}

// Handler is the page's HTTP handler. It answers GET and HEAD only (the page changes
// nothing), and serves the page, its embedded assets, the event stream, the state as JSON
// and the watched experiments' output files; nothing else. With loopback set it also refuses
// requests whose Host is not a loopback name, so that a web page elsewhere cannot reach it
// through a name it controls (DNS rebinding).
func Handler(h *Hub, loopback bool) http.Handler {
	mux := http.NewServeMux()
	mux.HandleFunc("GET /{$}", func(w http.ResponseWriter, r *http.Request) {
		page := strings.NewReplacer(
			"<!--STYLE-->", `<link rel="stylesheet" href="assets/page.css">`,
			"<!--SCRIPT-->", `<script src="assets/page.js"></script>`,
			"<!--DATA-->", "",
		).Replace(string(asset("index.html")))
		w.Header().Set("Content-Type", "text/html; charset=utf-8")
		w.Header().Set("Cache-Control", "no-store")
		w.Write([]byte(page))
	})
	for name, typ := range map[string]string{"page.js": "text/javascript; charset=utf-8", "page.css": "text/css; charset=utf-8"} {
		body := asset(name)
		mux.HandleFunc("GET /assets/"+name, func(w http.ResponseWriter, r *http.Request) {
			w.Header().Set("Content-Type", typ)
			w.Header().Set("Cache-Control", "no-cache")
			w.Write(body)
		})
	}
	mux.HandleFunc("GET /state", func(w http.ResponseWriter, r *http.Request) {
		h.mu.Lock()
		b, err := JSON(h.stateLocked())
		h.mu.Unlock()
		if err != nil {
			http.Error(w, "the state cannot be encoded", http.StatusInternalServerError)
			return
		}
		w.Header().Set("Content-Type", "application/json")
		w.Header().Set("Cache-Control", "no-store")
		w.Write(b)
	})
	mux.HandleFunc("GET /events", func(w http.ResponseWriter, r *http.Request) { events(w, r, h) })
	mux.HandleFunc("GET /files/{id}/{name}", func(w http.ResponseWriter, r *http.Request) { serveFile(w, r, h) })
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		w.Header().Set("X-Content-Type-Options", "nosniff")
		w.Header().Set("Referrer-Policy", "no-referrer")
		w.Header().Set("Content-Security-Policy", "default-src 'self'; img-src 'self' data:; frame-ancestors 'none'")
		if r.Method != http.MethodGet && r.Method != http.MethodHead {
			w.Header().Set("Allow", "GET, HEAD")
			http.Error(w, "this page is read-only", http.StatusMethodNotAllowed)
			return
		}
		if loopback && !loopbackHost(r.Host) {
			http.Error(w, "this page answers only to localhost", http.StatusForbidden)
			return
		}
		mux.ServeHTTP(w, r)
	})
}

// loopbackHost reports whether a Host header names this machine's loopback interface.
func loopbackHost(hostport string) bool {
	host := hostport
	if h, _, err := net.SplitHostPort(hostport); err == nil {
		host = h
	}
	host = strings.TrimSuffix(strings.TrimPrefix(host, "["), "]")
	if strings.EqualFold(host, "localhost") {
		return true
	}
	ip := net.ParseIP(host)
	return ip != nil && ip.IsLoopback()
}

// keepAlive is how often an idle event stream gets a comment line, so that a dead
// connection is noticed and proxies do not close a quiet one.
const keepAlive = 15 * time.Second

// events is the event stream: the whole state first, then every change as it happens.
func events(w http.ResponseWriter, r *http.Request, h *Hub) {
	fl, ok := w.(http.Flusher)
	if !ok {
		http.Error(w, "streaming unsupported", http.StatusInternalServerError)
		return
	}
	first, ch := h.subscribe()
	defer h.unsubscribe(ch)
	w.Header().Set("Content-Type", "text/event-stream")
	w.Header().Set("Cache-Control", "no-store")
	// retry: how soon the browser reconnects when the stream ends (the watcher restarted).
	w.Write([]byte("retry: 1000\n\n"))
	w.Write(first)
	fl.Flush()
	tick := time.NewTicker(keepAlive)
	defer tick.Stop()
	for {
		select {
		case <-r.Context().Done():
			return
		case m, ok := <-ch:
			if !ok {
				return
			}
			if _, err := w.Write(m); err != nil {
				return
			}
			// Take whatever else is already waiting before flushing: one write for a burst.
			for more := true; more; {
				select {
				case m, ok := <-ch:
					if !ok {
						fl.Flush()
						return
					}
					w.Write(m)
				default:
					more = false
				}
			}
			fl.Flush()
		case <-tick.C:
			if _, err := w.Write([]byte(": still here\n\n")); err != nil {
				return
			}
			fl.Flush()
		}
	}
}
