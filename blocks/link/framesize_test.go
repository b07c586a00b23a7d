package link_test

import (
	"fmt"
	"strings"
	"testing"

	"tally/blocks/channel"
	"tally/blocks/fec"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/rng"
	"tally/blocks/source"
)

// Fit rounds the source's frame up to the least length every block takes whole, and the
// rounded link runs. The lengths are worked out by hand from the blocks' definitions (common
// practice, no source): a modulator takes whole symbols of log2 M bits; Hamming (7,4) takes 4
// bits and gives 7; the K = 7 rate-1/2 code with its 6 tail bits gives 2(n + 6); RS(204,188)
// takes 188 bytes and gives 204; a block interleaver of 4 × 204 bytes takes 4·204·8 bits.
func TestFitRoundsUpToWholeUnits(t *testing.T) {
	for _, c := range []struct {
		name     string
		build    func(n int) *link.Link
		from, to int
	}{
		{"16-QAM, fits", func(n int) *link.Link {
			m := modem.QAM(16)
			return link.Chain(source.Random(n), m.Mod(), channel.AWGN(10), m.Demod())
		}, 2000, 2000},
		{"16-QAM", func(n int) *link.Link {
			m := modem.QAM(16)
			return link.Chain(source.Random(n), m.Mod(), channel.AWGN(10), m.Demod())
		}, 2001, 2004},
		// 4 | n and 2 | 7n/4: n a multiple of 8.
		{"Hamming (7,4), QPSK", func(n int) *link.Link {
			h, m := fec.Hamming74(), modem.QPSK()
			return link.Chain(source.Random(n), h.Encoder(), m.Mod(), channel.AWGN(10), m.Demod(), h.Decoder())
		}, 1001, 1008},
		// 3 | 2(n + 6): 1002.
		{"K = 7 code, 8-PSK", func(n int) *link.Link {
			c, m := fec.Conv(), modem.PSK(8)
			return link.Chain(source.Random(n), c.Encoder(), m.Mod(), channel.AWGN(10), m.Demod(), c.Decoder())
		}, 1000, 1002},
		// 1504 | n for RS, and 4 | n/1504 for the interleaver's 4 codewords: 6016, the
		// telemetry demo's record.
		{"RS, interleaver, K = 7 code, BPSK", func(n int) *link.Link {
			rs, il, c, m := fec.RS(204, 188), fec.BlockInterleaver(4, 204).Group(8), fec.Conv(), modem.BPSK()
			return link.Chain(source.Random(n), rs.Encoder(), il.Interleave(), c.Encoder(), m.Mod(), channel.AWGN(4),
				m.Demod().LogMAP(), c.Decoder(), il.Deinterleave(), rs.Decoder())
		}, 5000, 6016},
		{"LDPC (1024, 512) in 16-QAM", func(n int) *link.Link {
			c, m := fec.LDPCPEG(1024, 512, 3), modem.QAM(16)
			return link.Chain(source.Random(n), c.Encoder(), m.Mod(), channel.AWGN(6), m.Demod().LogMAP(), c.Decoder())
		}, 1000, 1024},
		// A punctured polar word sends 601 bits: QPSK needs two words, 600 source bits.
		{"polar punctured (601, 300), QPSK", func(n int) *link.Link {
			c, m := fec.PolarPunctured(601, 300), modem.QPSK()
			return link.Chain(source.Random(n), c.Encoder(), m.Mod(), channel.AWGN(4), m.Demod(), c.Decoder())
		}, 300, 600},
		// A shortened word sends 768 bits, whole 8-PSK symbols: no rounding.
		{"polar shortened (768, 384), 8-PSK", func(n int) *link.Link {
			c, m := fec.PolarShortened(768, 384), modem.PSK(8)
			return link.Chain(source.Random(n), c.Encoder(), m.Mod(), channel.AWGN(8), m.Demod(), c.Decoder())
		}, 384, 384},
	} {
		l := c.build(c.from)
		from, to, why := l.Fit()
		if from != c.from || to != c.to {
			t.Errorf("%s: Fit %d → %d, want %d → %d", c.name, from, to, c.from, c.to)
			continue
		}
		if (to != from) != (why != "") {
			t.Errorf("%s: reason %q for %d → %d", c.name, why, from, to)
		}
		var f link.Frame
		counts := make([]link.Tally, len(l.Taps()))
		if err := l.Run(&f, 1, 0, 0, counts); err != nil {
			t.Errorf("%s: the fitted link fails: %v", c.name, err)
		} else if counts[0].Trials != int64(c.to) {
			t.Errorf("%s: %d bits counted, want %d", c.name, counts[0].Trials, c.to)
		}
		if from != to {
			// Unfitted, the link fails: the rounding was needed.
			if err := c.build(c.from).Run(&f, 1, 0, 0, counts); err == nil {
				t.Errorf("%s: %d bits ran without rounding", c.name, c.from)
			}
		}
	}
}

// Exact keeps the script's length; a block of the script's own ends the walk, since Fit cannot
// know what it does to the length.
func TestFitKeepsExactAndStopsAtUnknownBlocks(t *testing.T) {
	m := modem.QAM(16)
	l := link.Chain(source.Random(2001).Exact(), m.Mod(), channel.AWGN(10), m.Demod())
	if from, to, _ := l.Fit(); from != to {
		t.Errorf("Exact: %d → %d", from, to)
	}
	double := link.Func("repeat", func(f *link.Frame, r *rng.Stream) { f.Coded = append(f.Coded, f.Coded...) })
	l = link.Chain(source.Random(2001), double, m.Mod())
	if from, to, _ := l.Fit(); from != to {
		t.Errorf("after a custom block: %d → %d", from, to)
	}
}

func ExampleLink_Fit() {
	m := modem.QAM(16)
	l := link.Chain(source.Random(1000+2), m.Mod(), channel.AWGN(10), m.Demod())
	from, to, why := l.Fit()
	fmt.Println(from, "→", to, "bits:", strings.TrimSpace(why))
	// Output: 1002 → 1004 bits: modem.QAM(16).Mod takes 4 bits at a time
}
