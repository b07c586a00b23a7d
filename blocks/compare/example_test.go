package compare_test

import (
	"fmt"

	"tally/blocks/compare"
)

// A receiver change moved a point from 112 errors in 4·10⁷ bits to 171 in 4.1·10⁷ bits.
func ExampleProportions() {
	r, err := compare.Proportions(112, 40_000_000, 171, 41_000_000)
	if err != nil {
		panic(err)
	}
	fmt.Printf("ratio %.2f, p = %.3f, significant at 5 %%: %v\n", r.Ratio, r.P, r.Significant(0.05))
	// Output: ratio 1.49, p = 0.001, significant at 5 %: true
}
