package theory_test

import (
	"fmt"

	"tally/blocks/theory"
)

func ExampleQAM() {
	for _, db := range []float64{6, 10, 14} {
		fmt.Printf("16-QAM at %2.0f dB: BER %.2e\n", db, theory.QAM(16, db))
	}
	// Output:
	// 16-QAM at  6 dB: BER 2.79e-02
	// 16-QAM at 10 dB: BER 1.75e-03
	// 16-QAM at 14 dB: BER 2.76e-06
}

func ExampleEbN0For() {
	db := theory.EbN0For(1e-5, theory.BPSK)
	fmt.Printf("BPSK needs %.1f dB for BER 1e-5\n", db)
	// Output: BPSK needs 9.6 dB for BER 1e-5
}
