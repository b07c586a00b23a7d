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

const record = 4 * 188 * 8 // bits per frame: four RS messages, a multiple of 4 for Hamming

func main() {
	x := sim.New("Ice-buoy telemetry: coded and uncoded BPSK")
	x.Sweep("ebn0_db", sim.Range(0, 11, 0.5)...)
	x.SweepLabels("code", "uncoded", "hamming", "conv_hard", "conv_soft", "rs_conv")
	x.Link(func(p sim.Point) *link.Link {
		m := modem.BPSK()
		ch := channel.AWGN(p.Get("ebn0_db"))
		src := source.Random(record)
		switch p.Label("code") {
		case "hamming":
			h := fec.Hamming74()
			return link.Chain(src, h.Encoder(), m.Mod(), ch, m.Demod(), h.Decoder())
		case "conv_hard":
			c := fec.Conv()
			return link.Chain(src, c.Encoder(), m.Mod(), ch, m.Demod(), c.Decoder())
		case "conv_soft":
			c := fec.Conv()
			return link.Chain(src, c.Encoder(), m.Mod(), ch, m.Demod().LogMAP(), c.Decoder())
		case "rs_conv":
			rs, il, c := fec.RS(204, 188), fec.BlockInterleaver(4, 204).Group(8), fec.Conv()
			return link.Chain(src, rs.Encoder(), il.Interleave(), c.Encoder(), m.Mod(), ch,
				m.Demod().LogMAP(), c.Decoder(), il.Deinterleave(), rs.Decoder())
		}
		// Uncoded: no decoder, so no pre-FEC tap (its columns stay empty in the table).
		return link.Chain(src, m.Mod(), ch, m.Demod())
	})
	x.Stop(stop.Errors(20), stop.Bits(6e4))
	x.StopSweep(stop.Floor(1e-6))
	x.Theory("expected", func(p sim.Point) float64 {
		db := p.Get("ebn0_db")
		switch p.Label("code") {
		case "uncoded":
			return theory.BPSK(db)
		case "hamming":
			return theory.Hamming74(db)
		case "conv_hard":
			return math.Min(theory.ConvK7Hard(db), 0.5)
		case "conv_soft":
			return math.Min(theory.ConvK7Soft(db), 0.5)
		}
		return math.NaN() // no closed form for the concatenated code: left out of table and plot
	})
	x.Target(1e-5, "expected")
	x.Run()
}
