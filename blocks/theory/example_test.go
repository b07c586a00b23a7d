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

func ExampleNormalApprox() {
	// What no code of 512 information bits in 1024 BPSK symbols can beat, against the Shannon
	// limit of rate 1/2 (infinite length).
	fmt.Printf("Shannon limit of rate 1/2: %.2f dB\n", theory.ShannonLimit(0.5))
	for _, db := range []float64{1, 2} {
		fmt.Printf("(1024, 512) at %.0f dB: FER ≥ about %.1e\n", db, theory.NormalApprox(1024, 512, db))
	}
	// Output:
	// Shannon limit of rate 1/2: 0.19 dB
	// (1024, 512) at 1 dB: FER ≥ about 3.6e-03
	// (1024, 512) at 2 dB: FER ≥ about 7.6e-10
}
