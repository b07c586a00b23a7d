package engine

import (
	"testing"

	"tally/blocks/carrier"
	"tally/blocks/channel"
	"tally/blocks/equalize"
	"tally/blocks/fec"
	"tally/blocks/impair"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/noise"
	"tally/blocks/pulse"
	"tally/blocks/rng"
	"tally/blocks/source"
)

// The exemption of tally's compiled blocks from the frame comparison rests on their contract
// (package link: buffers in the block's own value, no state from frame to frame). This holds
// it to the check itself: links of every block family, each with a script's no-op block added
// so the full comparison runs (alone, again, alternating and in parallel), pass it.
func TestBuiltinBlocksPassInstanceCheck(t *testing.T) {
	noop := func() link.Block { return link.Func("noop", func(f *link.Frame, r *rng.Stream) {}) }
	links := map[string]func() *link.Link{
		"coded QPSK": func() *link.Link {
			rs, il, cc := fec.RS(204, 188), fec.BlockInterleaver(4, 204).Group(8), fec.Conv().Puncture("3/4")
			m := modem.QPSK()
			return link.Chain(source.Random(4*188*8), rs.Encoder(), il.Interleave(), cc.Encoder(), m.Mod(), channel.AWGN(4.5),
				noop(), m.Demod().LogMAP(), cc.Decoder(), il.Deinterleave(), rs.Decoder())
		},
		"hamming, random interleaver": func() *link.Link {
			h, il := fec.Hamming84(), fec.RandomInterleaver()
			m := modem.BPSK()
			dec := h.Decoder()
			return link.Chain(source.PRBS(15, 2048), h.Encoder(), il.Interleave(), m.Mod(), noise.ClassA(6, 0.1, 0.01), noop(),
				m.Demod(), il.Deinterleave(), dec).Count("detected", dec.Detected)
		},
		"shaped QPSK with timing recovery": func() *link.Link {
			p := pulse.RRC(0.35).Span(12).SPS(4)
			m := modem.QPSK()
			return link.Chain(source.Random(4096), m.Mod(), p.Shape(), pulse.Timing(0.3).Drift(50), channel.AWGN(8),
				p.Match(), noop(), pulse.Gardner(), m.Demod())
		},
		"equalized multipath": func() *link.Link {
			ch := channel.Multipath([]complex128{0.3, 1, 0.4i})
			m := modem.QAM(16)
			return link.Chain(source.Random(8192), m.Mod(), ch, channel.AWGN(14), noop(), equalize.LMS(11, 0.05).Training(128), m.Demod())
		},
		"impaired QAM with carrier recovery": func() *link.Link {
			m := modem.QAM(16)
			return link.Chain(source.Random(8192), m.Mod(), impair.Rapp(6, 2), impair.IQ(0.5, 2), impair.PhaseNoise(1e-4),
				impair.Phase(10), channel.AWGN(16), impair.ADC(8), noop(), carrier.BlindPhase(32, 32), m.Demod())
		},
		"fading QPSK, M-th power": func() *link.Link {
			m := modem.QPSK()
			return link.Chain(source.Random(4096), m.Mod(), channel.Rician(6).Hold(64), channel.AWGN(12), noop(),
				noise.BernoulliGaussian(12, 0.01, 100), carrier.MPower(32), m.Demod())
		},
	}
	for name, mk := range links {
		build := func() (*link.Link, error) { return mk(), nil }
		first, _ := build()
		if err := first.Check(); err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		second, _ := build()
		if err := checkInstances(Spec{Point: 1, Seed: 3, Build: build}, first, second); err != nil {
			t.Errorf("%s: %v", name, err)
		}
	}
}
