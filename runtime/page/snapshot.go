package page

import (
	"bytes"
	"strings"
	"time"

	"tally/runtime/result"
)

// Snapshot is the page of finished runs as one self-contained HTML file (styles, script and
// data inside it), for a colleague to open from a folder or a mail: no server, no network.
// script is each run's script path as the links should show it.
func Snapshot(runs []*result.Run, scripts []string, at time.Time) ([]byte, error) {
	h := NewHub()
	h.now = func() time.Time { return at }
	for i, r := range runs {
		v := h.ensure(scripts[i])
		v.Status, v.Good, v.Files = Done, r, nil
		if !r.End.IsZero() && !r.Start.IsZero() {
			v.Took = r.End.Sub(r.Start).Seconds()
		}
	}
	data, err := JSON(struct {
		state
		Snapshot int64 `json:"snapshot"`
	}{h.stateLocked(), at.UnixMilli()})
	if err != nil {
		return nil, err
	}
	// The data sits in a script element: "</" must not appear in it (JSON allows "<\/").
	data = bytes.ReplaceAll(data, []byte("</"), []byte(`<\/`))
	page := strings.NewReplacer(
		"<!--STYLE-->", "<style>\n"+string(asset("page.css"))+"</style>",
		"<!--SCRIPT-->", "<script>\n"+string(asset("page.js"))+"</script>",
		"<!--DATA-->", `<script type="application/json" id="snapshot">`+string(data)+"</script>",
	).Replace(string(asset("index.html")))
	return []byte(page), nil
}
