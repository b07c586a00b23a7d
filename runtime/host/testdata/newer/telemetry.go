//go:build ignore

// Ice-buoy telemetry: a drifting buoy frozen into sea ice sends its hourly record (four
// 188-byte packets, 6016 bits) to an aircraft that passes overhead, BPSK on a low-power UHF
// link. The buoy's battery sets the budget: how much Eb/N0 does each coding option save at
// the design point, a decoded BER of 1e-5?
//
//	uncoded    BPSK alone
//	hamming    Hamming (7,4), hard decisions
//	conv_hard  K = 7, rate 1/2 convolutional code (133/171), hard-decision Viterbi
//	conv_soft  the same code, soft-decision Viterbi on the demodulator's LLRs
//	rs_conv    RS(204,188) outer code, byte interleaver of depth 4, the K = 7 code inside
//
// Each coded curve shows the pre-FEC BER (the demodulator on the coded bits, at the lower
// energy per coded bit the code costs), the decoded BER and the frame error rate; the target
// report gives the Eb/N0 at 1e-5 and the coding gain over the uncoded link. The theory column
// is the curve each option should meet: BPSK, the exact Hamming (7,4) BER, and the union bounds
// of the K = 7 code (capped at 1/2; an upper bound, tight below about 1e-4). The link and its
// figures are invented for this demo.
package main

import (
	"math"

	"tally/blocks/channel"
	"tally/blocks/fec"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/source"
	"tally/blocks/stop"
	"tally/blocks/theory"
	"tally/runtime/sim"
)

const record = 4 * 188 * 8 // bits per frame: four RS messages

func main() {
	x := sim.New("Ice-buoy telemetry: coded and uncoded BPSK")
	ebn0 := x.Axis("ebn0_db", sim.Range(0, 11, 0.5)...)
	capped := func(bound func(float64) float64) func(float64) float64 { // a union bound, at most 1/2
		return func(db float64) float64 { return math.Min(bound(db), 0.5) }
	}
	x.Legend("code").TheoryName("expected")
	x.Curve("uncoded", func(p sim.Point) *link.Link {
		m := modem.BPSK()
		return link.Chain(source.Random(record), m.Mod(), channel.AWGN(ebn0.At(p)), m.Demod())
	}).Theory(theory.BPSK)
	x.Curve("hamming", func(p sim.Point) *link.Link {
		h, m := fec.Hamming74(), modem.BPSK()
		return link.Chain(source.Random(record), h.Encoder(), m.Mod(), channel.AWGN(ebn0.At(p)), m.Demod(), h.Decoder())
	}).Theory(theory.Hamming74)
	x.Curve("conv_hard", func(p sim.Point) *link.Link {
		c, m := fec.Conv(), modem.BPSK()
		return link.Chain(source.Random(record), c.Encoder(), m.Mod(), channel.AWGN(ebn0.At(p)), m.Demod(), c.Decoder())
	}).Theory(capped(theory.ConvK7Hard))
	x.Curve("conv_soft", func(p sim.Point) *link.Link {
		c, m := fec.Conv(), modem.BPSK()
		return link.Chain(source.Random(record), c.Encoder(), m.Mod(), channel.AWGN(ebn0.At(p)), m.Demod().LogMAP(), c.Decoder())
	}).Theory(capped(theory.ConvK7Soft))
	x.Curve("rs_conv", func(p sim.Point) *link.Link { // no closed form: no theory
		rs, il, c, m := fec.RS(204, 188), fec.BlockInterleaver(4, 204).Group(8), fec.Conv(), modem.BPSK()
		return link.Chain(source.Random(record), rs.Encoder(), il.Interleave(), c.Encoder(), m.Mod(), channel.AWGN(ebn0.At(p)),
			m.Demod().LogMAP(), c.Decoder(), il.Deinterleave(), rs.Decoder())
	})
	x.Stop(stop.Errors(20), stop.Bits(6e4))
	x.StopSweep(stop.Floor(1e-6))
	x.Target(1e-5)
	x.Run()
}
