package stats_test

import (
	"fmt"

	"tally/blocks/stats"
)

// Two receivers on the same 20 000 frames of 1000 bits (the same bits, the same noise): A
// makes 2 errors in every tenth frame; B makes the same errors, but one more in every
// fortieth frame and one fewer in every sixtieth. Paired frame by frame, the difference is
// shown; the same counts taken as two independent runs do not show it.
func ExampleComparePaired() {
	var t stats.PairedTally
	for f := range 20000 {
		var a, b int64
		if f%10 == 0 {
			a, b = 2, 2
		}
		if f%40 == 1 {
			b++ // an error of its own
		}
		if f%60 == 0 {
			b-- // and one of A's put right
		}
		t.Add(a, b, 1000, 1000, max(0, a-b), max(0, b-a))
	}
	paired := stats.ComparePaired(t, 0.95)
	unpaired := stats.CompareUnpaired(t, 0.95)
	fmt.Printf("BER %.3g and %.3g\n", paired.RateA, paired.RateB)
	fmt.Printf("paired:   %.2g [%.2g, %.2g]  %s\n", paired.Diff, paired.DiffLow, paired.DiffHigh, paired.VerdictFor("old", "new"))
	fmt.Printf("unpaired: %.2g [%.2g, %.2g]  %s\n", unpaired.Diff, unpaired.DiffLow, unpaired.DiffHigh, unpaired.VerdictFor("old", "new"))
	fmt.Printf("ratio %.3g [%.3g, %.3g]\n", paired.Ratio, paired.RatioLow, paired.RatioHigh)
	// Output:
	// BER 0.0002 and 0.000208
	// paired:   8.3e-06 [3.9e-06, 1.3e-05]  new makes more errors than old (p = 7.1e-7)
	// unpaired: 8.3e-06 [-9.7e-06, 2.6e-05]  no difference shown (p = 1)
	// ratio 1.04 [1.02, 1.07]
}
