//go:build ignore

// Which equaliser for the vineyard gateway? A QPSK link of our own design carries soil and
// weather readings from a hillside vineyard to a farm gateway; a ground bounce off the
// terraces reaches the receiver one and two symbols late, a static echo the receiver must
// equalise. The shipped receiver uses an 11-tap LMS equaliser with step μ = 0.03, trained on
// the first 256 symbols of each 1024-symbol frame. Two candidates: the same LMS with a smaller
// step (μ = 0.008: less misadjustment, slower to converge within the preamble), and an MMSE
// equaliser designed from the measured echo (what the gateway could run if the echo were
// measured once at installation). The three run on the same frames — the same bits, the same
// noise — so small differences between them show with few bits.
package main

import (
	"tally/blocks/channel"
	"tally/blocks/equalize"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/source"
	"tally/blocks/stop"
	"tally/runtime/sim"
)

func main() {
	x := sim.New("Vineyard gateway: three equalisers on the same frames")
	ebn0 := x.Axis("ebn0_db", sim.Range(4, 10, 2)...)
	x.Variants("receiver", "LMS 0.03", "LMS 0.008", "MMSE")
	echo := []complex128{1, 0.42i, -0.18}
	x.Link(func(p sim.Point) *link.Link {
		m := modem.QPSK()
		l := link.Chain(source.Random(2048), m.Mod(), channel.Multipath(echo), channel.AWGN(ebn0.At(p)))
		switch p.Label("receiver") {
		case "LMS 0.03":
			l.Add(equalize.LMS(11, 0.03))
		case "LMS 0.008":
			l.Add(equalize.LMS(11, 0.008))
		case "MMSE":
			l.Add(equalize.MMSE(echo, 11))
		}
		return l.Add(m.Demod())
	})
	// A point ends once each candidate is settled against the shipped receiver — shown to make
	// fewer or more errors, or shown within ±10 % of its errors — or at 8 million bits.
	x.Stop(stop.Shown(), stop.Within(0.1), stop.Bits(8e6))
	x.Run()
}
