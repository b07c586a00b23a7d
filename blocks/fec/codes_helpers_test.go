package fec_test

import (
	"fmt"
	"testing"

	"tally/blocks/channel"
	"tally/blocks/internal/linktest"
	"tally/blocks/link"
	"tally/blocks/rng"
)

// Helpers shared by the tests of the modern codes (LDPC, polar, BCH).

func srcBits(n int) *linktest.Source { return &linktest.Source{N: n} }

// softLink is source → encoder → BPSK → AWGN(Eb/N0) → exact LLRs → decoder.
func softLink(n int, ebn0 float64, enc, dec link.Block) *link.Link {
	return link.Chain(srcBits(n), enc, &bpsk{}, channel.AWGN(ebn0), &bpskDemod{soft: true}, dec)
}

// benchLink measures the last block of l alone: it runs 16 frames through the blocks before it
// once, then decodes them in turn, and reports information bits decoded per CPU second of the
// process (a shared machine's wall time says little), in Mbit/s.
func benchLink(b *testing.B, l *link.Link, infoBits int) {
	blocks := l.Blocks()
	front := link.Chain(blocks[:len(blocks)-1]...)
	dec := blocks[len(blocks)-1]
	const frames = 16
	saved := make([]link.Frame, frames)
	for i := range saved {
		var f link.Frame
		counts := make([]link.Tally, len(front.Taps()))
		if err := runFront(front, &f, i, counts); err != nil {
			b.Fatal(err)
		}
		f.LLR = append([]float64(nil), f.LLR...)
		f.Hard = append([]byte(nil), f.Hard...)
		f.Coded = append([]byte(nil), f.Coded...)
		f.Bits = append([]byte(nil), f.Bits...)
		saved[i] = f
	}
	var f link.Frame
	i := 0
	start := cpuTime()
	for b.Loop() {
		f = saved[i%frames]
		f.Out = nil
		if err := dec.Process(&f, nil); err != nil {
			b.Fatal(err)
		}
		i++
	}
	b.ReportMetric(float64(i)*float64(infoBits)/(cpuTime()-start).Seconds()/1e6, "Mbit/cpu-s")
}

// runFront runs a link that ends before a decoder: its output count would fail, so the blocks
// are run one by one on the frame (the link's own streams are not needed for a benchmark).
func runFront(l *link.Link, f *link.Frame, index int, _ []link.Tally) error {
	*f = link.Frame{Index: index, SPS: 1, CodeRate: 1, Es: 1}
	for k, b := range l.Blocks() {
		s := rngFor(index, k)
		if err := b.Process(f, s); err != nil {
			return fmt.Errorf("%s: %w", link.NameOf(b), err)
		}
	}
	return nil
}

func rngFor(index, block int) *rng.Stream { return rng.New(rng.Key(7, 0, index, block)) }
