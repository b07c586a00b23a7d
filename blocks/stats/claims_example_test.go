package stats_test

import (
	"fmt"

	"tally/blocks/link"
	"tally/blocks/stats"
)

// Is BER ≤ 2e-5 shown by 10 errors in a million bits? The one-sided 95 % limit says yes; the
// two-sided interval's upper end is higher.
func ExampleUpperLimit() {
	u, _ := stats.UpperLimit(10, 1000000, 0.95)
	e, _ := stats.ClopperPearson(10, 1000000, 0.95)
	fmt.Printf("one-sided %.3g, two-sided upper end %.3g, shown ≤ 2e-5: %v\n", u, e.High, u <= 2e-5)
	// Output: one-sided 1.7e-05, two-sided upper end 1.84e-05, shown ≤ 2e-5: true
}

// 100 errors in 100 000 frames of 1024 bits, two of them in the same frame: what independent
// errors give. The same errors as 20 bursts of 5 in 20 frames are bursts.
func ExampleBurstTest() {
	spread := link.Tally{Trials: 1024 * 100000, Errors: 100, Frames: 100000, Squares: 98 + 4}
	bursts := link.Tally{Trials: 1024 * 100000, Errors: 100, Frames: 100000, Squares: 20 * 25}
	fmt.Println(stats.BurstTest(spread, 0.001))
	fmt.Println(stats.BurstTest(bursts, 0.001))
	// Output:
	// false exact conditional, Monte Carlo
	// true exact conditional moments, Cantelli bound
}

// No errors in 3800 frames of 1000 bits show the rate below 1e-3 at 95 % (evidence ≥ ln 20),
// however errors might cluster within a frame; 3600 frames do not yet.
func ExampleFrameEvidence() {
	for _, f := range []int64{3600, 3800} {
		e := stats.FrameEvidence(link.Tally{Trials: 1000 * f, Frames: f}, 1e-3, true)
		fmt.Printf("%d frames: %.2f\n", f, e)
	}
	// Output:
	// 3600 frames: 2.90
	// 3800 frames: 3.09
}
