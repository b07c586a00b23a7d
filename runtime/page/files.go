package page

import (
	"net/http"
	"os"
	"path/filepath"
	"slices"
	"strings"

	"tally/runtime/output"
)

// fileTypes are the output files a run writes beside its script and the page may serve: no
// other name is ever served, whatever the folder holds.
var fileTypes = map[string]string{
	"table.csv":   "text/csv; charset=utf-8",
	"run.json":    "application/json",
	"README.md":   "text/markdown; charset=utf-8",
	"ber.svg":     "image/svg+xml",
	"ber.png":     "image/png",
	"scatter.svg": "image/svg+xml",
	"scatter.png": "image/png",
	"index.html":  "text/html; charset=utf-8",
}

// fileOrder is the order the page lists them in.
var fileOrder = []string{"table.csv", "run.json", "ber.svg", "ber.png", "scatter.svg", "scatter.png", "README.md"}

// outputFiles are the output files of a script that the page may link to.
func outputFiles(script string) []string {
	var out []string
	for _, name := range fileOrder {
		if _, err := resolve(script, name); err == nil {
			out = append(out, name)
		}
	}
	return out
}

// errRefused is a file that exists but may not be served (outside the folder, not regular).
type refusal string

func (r refusal) Error() string { return string(r) }

// resolve is the path of output file name of script, once it is known to be one of the
// output files, a regular file, and (all links followed) inside the script's own folder.
func resolve(script, name string) (string, error) {
	if _, ok := fileTypes[name]; !ok || strings.ContainsAny(name, `/\`) {
		return "", os.ErrNotExist
	}
	p := filepath.Join(output.Dir(script), name)
	if _, err := os.Lstat(p); err != nil {
		return "", os.ErrNotExist
	}
	root, err := filepath.EvalSymlinks(filepath.Dir(script))
	if err != nil {
		return "", os.ErrNotExist
	}
	real, err := filepath.EvalSymlinks(p)
	if err != nil {
		return "", refusal("a link that leads nowhere")
	}
	rel, err := filepath.Rel(root, real)
	if err != nil || rel == ".." || strings.HasPrefix(rel, ".."+string(filepath.Separator)) || filepath.IsAbs(rel) {
		return "", refusal("outside the experiment's folder")
	}
	st, err := os.Stat(real)
	if err != nil || !st.Mode().IsRegular() {
		return "", refusal("not a regular file")
	}
	return real, nil
}

// serveFile answers /files/{id}/{name}: an output file of a watched experiment, or a refusal.
func serveFile(w http.ResponseWriter, r *http.Request, h *Hub) {
	id, name := r.PathValue("id"), r.PathValue("name")
	h.mu.Lock()
	script, known := h.ids[id]
	h.mu.Unlock()
	if !known || !slices.Contains(fileOrder, name) {
		http.Error(w, "no such file", http.StatusNotFound)
		return
	}
	p, err := resolve(script, name)
	if err != nil {
		if _, ok := err.(refusal); ok {
			http.Error(w, "refused: "+err.Error(), http.StatusForbidden)
			return
		}
		http.Error(w, "no such file", http.StatusNotFound)
		return
	}
	f, err := os.Open(p)
	if err != nil {
		http.Error(w, "no such file", http.StatusNotFound)
		return
	}
	defer f.Close()
	st, err := f.Stat()
	if err != nil {
		http.Error(w, "no such file", http.StatusNotFound)
		return
	}
	w.Header().Set("Content-Type", fileTypes[name])
	// An output file is data: no script of its own runs (an SVG opened directly, say).
	w.Header().Set("Content-Security-Policy", "default-src 'none'; style-src 'unsafe-inline'; img-src data:")
	w.Header().Set("Cache-Control", "no-cache")
	http.ServeContent(w, r, "", st.ModTime(), f)
}
