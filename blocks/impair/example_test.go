package impair_test

import (
	"fmt"

	"tally/blocks/impair"
	"tally/blocks/link"
)

// A receiver front end as a chain of impairments, in the order the signal meets them
// (a modulator before and a channel, recovery and demodulator after would complete the link).
func Example() {
	front := []link.Block{
		impair.Saleh(6),         // TWT at 6 dB input back-off
		impair.Phase(10),        // 10° carrier phase offset
		impair.PhaseNoise(1e-4), // Δν·T = 1e-4
		impair.IQ(0.5, 2),       // Q branch 0.5 dB high, 2° off quadrature
		impair.ADC(6).Load(10),  // 6-bit converter, AGC at 10 dB loading
	}
	for _, b := range front {
		fmt.Println(link.NameOf(b))
	}
	fmt.Printf("image rejection %.1f dB\n", impair.IQ(0.5, 2).ImageRejection())
	// Output:
	// impair.Saleh
	// impair.Phase
	// impair.PhaseNoise
	// impair.IQ
	// impair.ADC
	// image rejection 29.5 dB
}
