package channel_test

import (
	"fmt"

	"tally/blocks/channel"
)

// A fading link: the channel applies the gain, AWGN adds noise at the average Eb/N0, and
// KnownGain is the receiver with perfect channel knowledge.
//
//	link.Chain(source.Random(4096), m.Mod(),
//		channel.Rayleigh().Doppler(0.01), channel.AWGN(ebn0), channel.KnownGain(), m.Demod())
func ExampleRayleigh() {
	c := channel.Rayleigh().Doppler(0.01)
	fmt.Println(c.Name(), c.FD, c.Err())
	fmt.Println(channel.RicianDB(6).Hold(64).Err())
	fmt.Println(channel.Rician(-3).Err())
	// Output:
	// channel.Rayleigh 0.01 <nil>
	// <nil>
	// channel.Rician: K = -3 is not a finite number ≥ 0
}

// A static three-path channel, scaled to unit energy.
func ExampleMultipath() {
	c := channel.Multipath([]complex128{0.8, 0.4, 0.2})
	fmt.Printf("%.3f\n", c.Taps())
	// Output:
	// [(0.873+0.000i) (0.436+0.000i) (0.218+0.000i)]
}
