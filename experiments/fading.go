//go:build ignore

// Tractor-to-barn telemetry: a tractor working a field sends engine and tank readings to a
// receiver on the barn roof, QPSK at 4800 baud on a 915 MHz carrier, root-raised-cosine pulses
// (roll-off 0.35). There is no line of sight over the crop rows, so the link is taken as
// Rayleigh; the tractor crawls at walking pace, 1.4 m/s, a maximum Doppler shift of
// fD = v·fc/c ≈ 4.3 Hz, fD·T ≈ 9e-4. The receiver is assumed to know the channel gain (its own
// pilot tracking, not simulated: channel.KnownGain stands in for it).
//
// The sweep compares walking pace with the farm's quad bike at 12 m/s (fD·T ≈ 0.008): both
// must follow the same average-BER curve, the Rayleigh one, far above AWGN, since the average
// over the fading does not depend on how fast it changes. What speed changes is how errors
// bunch: at walking pace they come in bursts one fade long (about a thousand symbols), so the
// binomial intervals drawn for that curve are too narrow and its points scatter more about the
// theory. All figures are invented for this demo.
package main

import (
	"tally/blocks/channel"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/pulse"
	"tally/blocks/source"
	"tally/blocks/stop"
	"tally/blocks/theory"
	"tally/runtime/sim"
)

func main() {
	const (
		baud    = 4800.0
		carrier = 915e6 // Hz
		light   = 3e8   // m/s
	)
	x := sim.New("Tractor-to-barn telemetry: QPSK in Rayleigh fading")
	ebn0 := x.Axis("ebn0_db", sim.Range(0, 30, 3)...)
	tractor := func(v float64) func(p sim.Point) *link.Link { // the link at v m/s
		fd := v * carrier / light // maximum Doppler shift, Hz
		return func(p sim.Point) *link.Link {
			m := modem.QPSK()
			rrc := pulse.RRC(0.35).Span(8).SPS(4)
			return link.Chain(
				source.Random(2048),
				m.Mod(),
				rrc.Shape(),
				channel.Rayleigh().Doppler(fd/baud),
				channel.AWGN(ebn0.At(p)),
				rrc.Match(),
				pulse.Sample(),
				channel.KnownGain(),
				m.Demod(),
			)
		}
	}
	x.Reference("awgn", theory.QPSK)
	x.Legend("speed").TheoryName("rayleigh")
	x.Curve("walking", tractor(1.4)).Theory(theory.QPSKRayleigh)
	x.Curve("quad_bike", tractor(12)).Theory(theory.QPSKRayleigh)
	x.Stop(stop.Errors(3000), stop.Bits(3e6)) // many errors: at walking pace they come in bursts
	x.Target(1e-3)
	x.Run()
}
