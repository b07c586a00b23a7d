package plots

import (
	"bytes"
	"image/color"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"
)

// Figure is a drawing: a title band, one or more panels side by side, and a legend column on
// the right that never covers data.
type Figure struct {
	Title   string
	Caption string // a line under the title (seed, interval method, …)
	Panels  []*plot.Plot
	Legend  *Legend // nil or empty: no legend column
	Width   vg.Length
	Height  vg.Length
	DPI     int // of the PNG (default 150)
}

const (
	pad      = vg.Length(8)
	titleGap = vg.Length(6)
)

func (f *Figure) draw(c draw.Canvas) {
	c.SetColor(color.White)
	c.Fill(c.Rectangle.Path())
	top := c.Max.Y - pad
	if f.Title != "" {
		st := textStyle(sansBold(12), ink)
		st.YAlign = draw.YTop
		c.FillText(st, vg.Point{X: c.Min.X + pad, Y: top}, f.Title)
		top -= st.Height(f.Title) + 2
	}
	if f.Caption != "" {
		st := textStyle(sans(8), theoryCl)
		st.YAlign = draw.YTop
		c.FillText(st, vg.Point{X: c.Min.X + pad, Y: top}, f.Caption)
		top -= st.Height(f.Caption)
	}
	if f.Title != "" || f.Caption != "" {
		top -= titleGap
	}
	right := c.Max.X - pad
	if f.Legend != nil && len(f.Legend.names) > 0 {
		lw := f.Legend.width()
		lc := draw.Canvas{Canvas: c.Canvas, Rectangle: vg.Rectangle{
			Min: vg.Point{X: right - lw, Y: c.Min.Y + pad}, Max: vg.Point{X: right, Y: top - 10}}}
		pl := f.Legend.plot()
		pl.Draw(lc)
		right -= lw + pad
	}
	area := draw.Canvas{Canvas: c.Canvas, Rectangle: vg.Rectangle{
		Min: vg.Point{X: c.Min.X + pad/2, Y: c.Min.Y + pad/2}, Max: vg.Point{X: right, Y: top}}}
	tiles := draw.Tiles{Rows: 1, Cols: len(f.Panels), PadX: 3 * pad}
	row := [][]*plot.Plot{f.Panels}
	for i, pc := range plot.Align(row, tiles, area)[0] {
		if t, ok := f.Panels[i].X.Tick.Marker.(*sweepTicker); ok {
			// A lower bound of the data width: the panel less the y axis (its label, the room
			// for its tick labels, the ticks) and a margin.
			y := f.Panels[i].Y
			t.width = pc.Max.X - pc.Min.X - y.Label.Padding - y.Tick.Length - 3*y.Label.TextStyle.Height("0") - 30
		}
		f.Panels[i].Draw(pc)
	}
}

// SVG is the figure as an SVG document. It holds no time or random identifier, so the same
// run gives the same bytes.
func (f *Figure) SVG() ([]byte, error) {
	c := vgsvg.New(f.Width, f.Height)
	f.draw(draw.New(c))
	var b bytes.Buffer
	if _, err := c.WriteTo(&b); err != nil {
		return nil, err
	}
	// The canvas names the font it measured with; a viewer without it falls back to a serif
	// face unless told otherwise.
	return bytes.ReplaceAll(b.Bytes(), []byte("font-family:Liberation Sans;"),
		[]byte("font-family:'Liberation Sans',Arial,Helvetica,sans-serif;")), nil
}

// PNG is the figure as a PNG image at DPI dots per inch.
func (f *Figure) PNG() ([]byte, error) {
	dpi := f.DPI
	if dpi == 0 {
		dpi = 150
	}
	c := vgimg.NewWith(vgimg.UseWH(f.Width, f.Height), vgimg.UseDPI(dpi))
	f.draw(draw.New(c))
	var b bytes.Buffer
	if _, err := (vgimg.PngCanvas{Canvas: c}).WriteTo(&b); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}

func textStyle(fnt font.Font, cl color.Color) text.Style {
	return text.Style{Font: fnt, Color: cl, XAlign: draw.XLeft, YAlign: draw.YBottom, Handler: plot.DefaultTextHandler}
}

// Legend is a figure's key: a sample and a name per entry.
type Legend struct {
	names  []string
	thumbs []plot.Thumbnailer
}

// Add appends an entry.
func (l *Legend) Add(name string, t plot.Thumbnailer) {
	l.names = append(l.names, name)
	l.thumbs = append(l.thumbs, t)
}

func (l *Legend) plot() plot.Legend {
	pl := plot.NewLegend()
	pl.TextStyle = textStyle(sans(8.5), ink)
	pl.Top, pl.Left = true, true
	pl.ThumbnailWidth = vg.Points(22)
	pl.Padding = vg.Points(3)
	for i, n := range l.names {
		pl.Add(n, l.thumbs[i])
	}
	return pl
}

// width is the width of the widest entry with its sample.
func (l *Legend) width() vg.Length {
	st := textStyle(sans(8.5), ink)
	w := vg.Length(0)
	for _, n := range l.names {
		w = max(w, st.Width(n))
	}
	// The slack keeps the text inside when a viewer substitutes a wider face in the SVG.
	return w*1.1 + vg.Points(22) + vg.Points(8)
}
