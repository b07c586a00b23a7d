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
	x.Sweep("ebn0_db", sim.Range(1, 3, 1)...)
	x.SweepLabels("code", "conv", "ldpc", "polar_sc", "polar_l8")
	x.Link(func(p sim.Point) *link.Link {
		m := modem.BPSK()
		ch := channel.AWGN(p.Get("ebn0_db"))
		src := source.Random(block)
		switch p.Label("code") {
		case "ldpc":
			c := fec.LDPCPEG(2*block, block, 3)
			return link.Chain(src, c.Encoder(), m.Mod(), ch, m.Demod().LogMAP(), c.Decoder().Layer())
		case "polar_sc":
			c := fec.Polar(2*block, block)
			return link.Chain(src, c.Encoder(), m.Mod(), ch, m.Demod().LogMAP(), c.Decoder())
		case "polar_l8":
			c := fec.Polar(2*block, block).CRC(16)
			return link.Chain(src, c.Encoder(), m.Mod(), ch, m.Demod().LogMAP(), c.Decoder().List(8))
		}
		c := fec.Conv()
		return link.Chain(src, c.Encoder(), m.Mod(), ch, m.Demod().LogMAP(), c.Decoder())
	})
	// Frame errors are what count: 50 of them, or 2e6 bits (about 4000 blocks) per point; a
	// curve ends after its first point with no error in those bits.
	x.Stop(stop.Errors(5).Tap("fer"), stop.Bits(2e4))
	x.StopSweep(stop.Floor(2e-6))
	x.Limit("fer", "normal_approx", func(p sim.Point) float64 {
		n := 2 * block
		if p.Label("code") == "conv" {
			n = 2 * (block + 6)
		}
		return theory.NormalApprox(n, block, p.Get("ebn0_db"))
	})
	x.TargetOn("fer", 1e-2, "normal_approx")
	x.Run()
}
