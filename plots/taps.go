package plots

import (
	"slices"

	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"tally/blocks/link"
	"tally/runtime/result"
)

// leftTaps are the taps the left panel draws, the main one first: the run's shown taps
// (result.Run.ShownTaps) but the frame error rate, which has a panel of its own; the BER when
// that leaves none (a run judged on frames keeps the BER beside its FER panel). The
// pre-decoder BER of a coded link goes with the BER, as its companion.
func leftTaps(r *result.Run) []string {
	var taps []string
	for _, t := range r.ShownTaps() {
		if t != link.TapFER {
			taps = append(taps, t)
		}
	}
	if len(taps) == 0 {
		taps = []string{link.TapBER}
	}
	if slices.Contains(taps, link.TapBER) && !slices.Contains(taps, link.TapPre) && r.TapIndex(link.TapPre) >= 0 {
		i := slices.Index(taps, link.TapBER)
		taps = slices.Insert(taps, i+1, link.TapPre)
	}
	return taps
}

// leftLabel is the left panel's y label: "bit error rate" for the BER taps, else the tap's
// name ("payload error rate"), or "error rate" for several of the script's taps.
func leftLabel(taps []string) string {
	var own []string
	for _, t := range taps {
		if t != link.TapBER && t != link.TapPre {
			own = append(own, t)
		}
	}
	switch {
	case len(own) == 0:
		return "bit error rate"
	case len(own) == 1 && len(taps) == 1:
		return own[0] + " error rate"
	}
	return "error rate"
}

// tapLegend names a tap in the legend.
func tapLegend(tap string) string {
	switch tap {
	case link.TapBER:
		return "simulated BER"
	case link.TapFER:
		return "simulated FER"
	case link.TapPre:
		return "pre-decoder BER"
	}
	return "simulated " + tap
}

// tapStyle is how one tap's curve is drawn in the left panel.
type tapStyle struct {
	width  vg.Length
	dashes []vg.Length
	radius vg.Length
	glyph  draw.GlyphDrawer
}

// secondDashes are the lines of the taps after the first (the pre-decoder BER keeps its own).
var secondDashes = [][]vg.Length{
	{vg.Points(4), vg.Points(2)},
	{vg.Points(6), vg.Points(2), vg.Points(1), vg.Points(2)},
}

// styleOf is the style of the k-th tap drawn in the left panel: the first, the one shown,
// solid with filled dots; the pre-decoder BER dotted with rings; the others dashed with
// crosses and pluses.
func styleOf(k int, tap string) tapStyle {
	switch {
	case k == 0:
		return tapStyle{width: vg.Points(1.4), radius: vg.Points(2.6), glyph: draw.CircleGlyph{}}
	case tap == link.TapPre:
		return tapStyle{width: vg.Points(1.1), dashes: preDashes, radius: vg.Points(2.4), glyph: ring{}}
	}
	shapes := []draw.GlyphDrawer{draw.CrossGlyph{}, draw.PlusGlyph{}}
	return tapStyle{width: vg.Points(1.1), dashes: secondDashes[(k-1)%len(secondDashes)], radius: vg.Points(2.8), glyph: shapes[(k-1)%len(shapes)]}
}
