package engine

import (
	"context"
	"strings"
	"testing"

	"tally/blocks/channel"
	"tally/blocks/fec"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/rng"
	"tally/blocks/source"
	"tally/blocks/stop"
)

// leakyLink is the BSC test link with its decision buffer declared once, outside the function
// that builds each worker's link, as a script does by mistake when it declares a buffer above
// x.Link: every link's "bsc" block writes the same slice.
func leakyLink(p float64) func() (*link.Link, error) {
	var hard []byte // shared by every link built
	return func() (*link.Link, error) {
		var bits []byte
		src := link.Func("src", func(f *link.Frame, r *rng.Stream) {
			bits = link.GrowBytes(bits, frameBits)
			r.Bits(bits)
			f.Bits, f.Coded = bits, bits
		})
		bsc := link.Func("bsc", func(f *link.Frame, r *rng.Stream) {
			hard = link.GrowBytes(hard, len(f.Bits))
			for i, b := range f.Bits {
				if r.Float64() < p {
					b ^= 1
				}
				hard[i] = b
			}
			f.Hard = hard
		})
		return link.Chain(src, bsc), nil
	}
}

// A custom block whose buffer leaks between link instances is refused before any result, with
// one worker too (the table would differ at another count), naming the block and saying where
// buffers belong. The same link with its buffers inside runs, for any number of workers.
func TestLeakingCustomBlockRefused(t *testing.T) {
	for _, w := range []int{1, 2, 4} {
		spec := Spec{Point: testPoint, Seed: testSeed, Workers: w, Build: leakyLink(0.1), Rules: []stop.Rule{stop.Bits(100 * frameBits)}}
		_, err := Run(context.Background(), spec)
		if err == nil || !strings.Contains(err.Error(), `custom block "bsc"`) || !strings.Contains(err.Error(), "inside the Link function") {
			t.Errorf("workers %d: %v; want a refusal naming \"bsc\" and the Link function", w, err)
		}
		spec.Build = bscLink(0.1, false)
		if _, err := Run(context.Background(), spec); err != nil {
			t.Errorf("workers %d, a correct custom link: %v", w, err)
		}
	}
}

// A block that keeps state from frame to frame (a counter outside the frame) is refused too,
// and so is one block object put into every link.
func TestFrameStateAndSharedBlockRefused(t *testing.T) {
	counting := func() (*link.Link, error) {
		l, _ := bscLink(0.1, false)()
		n := 0
		return l.Add(link.Func("drift", func(f *link.Frame, r *rng.Stream) {
			n++
			if n > 1 {
				f.Hard[0] ^= 1
			}
		})), nil
	}
	spec := Spec{Point: testPoint, Seed: testSeed, Workers: 1, Build: counting, Rules: []stop.Rule{stop.Bits(10 * frameBits)}}
	if _, err := Run(context.Background(), spec); err == nil || !strings.Contains(err.Error(), `"drift"`) || !strings.Contains(err.Error(), "from one frame to the next") {
		t.Errorf("frame state: %v", err)
	}
	shared := link.Func("tap", func(f *link.Frame, r *rng.Stream) {})
	spec.Build = func() (*link.Link, error) {
		l, _ := bscLink(0.1, false)()
		return l.Add(shared), nil
	}
	if _, err := Run(context.Background(), spec); err == nil || !strings.Contains(err.Error(), `"tap"`) || !strings.Contains(err.Error(), "one object shared") {
		t.Errorf("shared block object: %v", err)
	}
}

// A compiled block made from an object the script made once, outside the function that
// builds each link, shares that object's state: a random interleaver keeps the permutation
// of the frame it is on, so one made outside is refused (naming the block after which frames
// differ), while a modem made outside, whose tables are only read, passes.
func TestSharedInterleaverRefusedSharedModemRuns(t *testing.T) {
	il := fec.RandomInterleaver()
	m := modem.QPSK()
	outside := func() (*link.Link, error) {
		return link.Chain(source.Random(1024), il.Interleave(), m.Mod(), channel.AWGN(3), m.Demod(), il.Deinterleave()), nil
	}
	spec := Spec{Point: testPoint, Seed: testSeed, Workers: 1, Build: outside, Rules: []stop.Rule{stop.Bits(20 * 1024)}}
	_, err := Run(context.Background(), spec)
	if err == nil || !strings.Contains(err.Error(), `block "fec.RandomInterleaver deinterleave"`) || !strings.Contains(err.Error(), "interleaver it comes from, inside the Link function") {
		t.Errorf("interleaver made outside: %v; want a refusal naming the deinterleaver", err)
	}
	spec.Build = func() (*link.Link, error) {
		il := fec.RandomInterleaver()
		return link.Chain(source.Random(1024), il.Interleave(), m.Mod(), channel.AWGN(3), m.Demod(), il.Deinterleave()), nil
	}
	if _, err := Run(context.Background(), spec); err != nil {
		t.Errorf("modem made outside, interleaver inside: %v", err)
	}
}
