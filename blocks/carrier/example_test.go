package carrier_test

import (
	"fmt"

	"tally/blocks/carrier"
	"tally/blocks/link"
)

// Recovery sits after the channel (and the matched filter), before the demodulator.
func Example() {
	for _, b := range []link.Block{
		carrier.MPower(32),           // QPSK / M-PSK: M-th power over 32 symbols
		carrier.MPower(32).Weight(2), // amplitude weighting ρ² instead of ρ^M
		carrier.BlindPhase(32, 32),   // QAM: 32 test phases, 32-symbol window
	} {
		fmt.Println(link.NameOf(b))
	}
	// Output:
	// carrier.MPower
	// carrier.MPower
	// carrier.BlindPhase
}
