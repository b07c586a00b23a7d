package noise_test

import (
	"fmt"

	"tally/blocks/noise"
)

// Impulsive channels at 8 dB Eb/N0, each with the noise power an AWGN channel would have.
func Example() {
	for _, c := range []interface{ Name() string }{
		noise.ClassA(8, 0.1, 0.01),            // A = 0.1, Γ = 0.01: strongly impulsive
		noise.BernoulliGaussian(8, 0.01, 100), // 1 % of samples hit, impulses 20 dB up
		noise.Laplacian(8),
	} {
		fmt.Println(c.Name())
	}
	// The centre of the Class A density towers over the Gaussian's (1/√(2π) ≈ 0.399).
	fmt.Printf("%.3f\n", noise.ClassAPDF(0, 0.1, 0.01, 1))
	// Output:
	// noise.ClassA
	// noise.BernoulliGaussian
	// noise.Laplacian
	// 3.640
}
