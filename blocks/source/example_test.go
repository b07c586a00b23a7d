package source_test

import (
	"fmt"

	"tally/blocks/link"
	"tally/blocks/rng"
	"tally/blocks/source"
)

func ExamplePRBS() {
	s := source.PRBS(7, 16) // x^7 + x^6 + 1, 16 bits per frame
	for i := range 2 {
		f := &link.Frame{Index: i}
		_ = s.Process(f, rng.New(0))
		fmt.Println(f.Bits)
	}
	// Output:
	// [1 1 1 1 1 1 1 0 0 0 0 0 0 1 0 0]
	// [0 0 0 1 1 0 0 0 0 1 0 1 0 0 0 1]
}

func ExamplePattern() {
	// A 1-0-0 pattern, 4 bits per frame: frame 1 carries on where frame 0 stopped.
	s := source.Pattern([]byte{1, 0, 0}, 4)
	for i := range 2 {
		f := &link.Frame{Index: i}
		_ = s.Process(f, rng.New(0))
		fmt.Println(f.Bits)
	}
	// Output:
	// [1 0 0 1]
	// [0 0 1 0]
}
