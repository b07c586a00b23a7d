//go:build ignore

// Glacier seismometer relay: geophones frozen into a glacier report each event as a 512-bit
// block over a low-power BPSK hop to a camp on the moraine. Every block must arrive whole (a
// block with any wrong bit is thrown away), so the figure of merit is the frame error rate, and
// the battery asks how close to the limit a code of this size can get. Four rate-1/2 codes carry
// the 512 bits:
//
//	conv      the K = 7 133/171 convolutional code, soft Viterbi (1036 coded bits with its tail)
//	ldpc      an LDPC code (1024, 512) built by progressive edge growth, column weight 3,
//	          sum-product decoding with the layered schedule, at most 50 iterations
//	polar_sc  a polar code (1024, 512) designed at 2 dB, successive cancellation
//	polar_l8  the polar code with a CRC-16 inside the 512 message bits' budget (528 information
//	          positions), CRC-aided list decoding with L = 8
//
// The limit drawn beside the frame error rate is the normal approximation of Polyanskiy, Poor
// and Verdú (2010) for 512 bits in 1024 BPSK symbols (1036 for the convolutional code): no code
// of that size does better, so a point below it beyond its interval is flagged as a mistake in
// the link. The Shannon limit of rate 1/2 on this channel, for infinite length, is 0.19 dB. The
// target report gives the Eb/N0 each code needs for a frame error rate of 1e-2 (one event in a
// hundred lost) and its distance from the normal approximation there; 1e-3 would need about ten
// times the blocks per point, more than a demo should spend. The link and its figures are invented for this demo.
package main

import (
	"tally/blocks/channel"
	"tally/blocks/fec"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/source"
	"tally/blocks/stop"
	"tally/blocks/theory"
	"tally/runtime/sim"
)

const block = 512 // message bits per event

func main() {
	x := sim.New("Glacier seismometer relay: 512-bit blocks, four rate-1/2 codes")
	ebn0 := x.Axis("ebn0_db", sim.Range(1, 3, 1)...)
	relay := func(p sim.Point, enc, dec link.Block) *link.Link { // BPSK over AWGN, LLRs to the decoder
		m := modem.BPSK()
		return link.Chain(source.Random(block), enc, m.Mod(), channel.AWGN(ebn0.At(p)), m.Demod().LogMAP(), dec)
	}
	limit := theory.NormalApproxCurve(2*block, block)
	x.Legend("code").TheoryName("normal_approx")
	x.Curve("conv", func(p sim.Point) *link.Link {
		c := fec.Conv()
		return relay(p, c.Encoder(), c.Decoder())
	}).Limit(link.TapFER, theory.NormalApproxCurve(2*(block+6), block)) // the tail: 1036 coded bits
	x.Curve("ldpc", func(p sim.Point) *link.Link {
		c := fec.LDPCPEG(2*block, block, 3)
		return relay(p, c.Encoder(), c.Decoder().Layer())
	}).Limit(link.TapFER, limit)
	x.Curve("polar_sc", func(p sim.Point) *link.Link {
		c := fec.Polar(2*block, block)
		return relay(p, c.Encoder(), c.Decoder())
	}).Limit(link.TapFER, limit)
	x.Curve("polar_l8", func(p sim.Point) *link.Link {
		c := fec.Polar(2*block, block).CRC(16)
		return relay(p, c.Encoder(), c.Decoder().List(8))
	}).Limit(link.TapFER, limit)
	// Frame errors are what count: 50 of them, or 2e6 bits (about 4000 blocks) per point; a
	// curve ends after its first point with no error in those bits.
	x.Stop(stop.Errors(5).Tap(link.TapFER), stop.Bits(2e4))
	x.StopSweep(stop.Floor(2e-6))
	x.TargetOn(link.TapFER, 1e-2)
	x.Run()
}
