package source_test

import (
	"fmt"

	"tally/blocks/link"
	"tally/blocks/modem"
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

// A frame length that a block after the source cannot take whole is rounded up by the run
// (link.Link.Fit); Exact keeps it as typed.
func ExampleRandomBits_Exact() {
	m := modem.QPSK()
	l := link.Chain(source.Random(1001), m.Mod(), m.Demod())
	from, to, _ := l.Fit()
	fmt.Println(from, "→", to)
	l = link.Chain(source.Random(1001).Exact(), m.Mod(), m.Demod())
	from, to, _ = l.Fit()
	fmt.Println(from, "→", to)
	// Output:
	// 1001 → 1002
	// 1001 → 1001
}
