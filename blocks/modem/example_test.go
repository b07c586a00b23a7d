package modem_test

import (
	"fmt"

	"tally/blocks/channel"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/source"
)

func ExampleQAM() {
	m := modem.QAM(16)
	fmt.Println(m.Name(), "carries", m.Bits, "bits per symbol")
	p := m.Points()
	fmt.Printf("label 0000 → %.4f, label 1111 → %.4f\n", p[0b0000], p[0b1111])
	// Output:
	// modem.QAM(16) carries 4 bits per symbol
	// label 0000 → (0.9487+0.9487i), label 1111 → (-0.3162-0.3162i)
}

func ExampleModem_Demod() {
	// A QPSK link at Eb/N0 = 4 dB with max-log soft outputs; the link counts the hard
	// decisions (the LLR signs) against the source bits. Theory: Q(√(2·10^0.4)) = 0.0125.
	m := modem.QPSK()
	l := link.Chain(source.Random(1000), m.Mod(), channel.AWGN(4), m.Demod().MaxLog())
	counts := make([]link.Tally, len(l.Taps()))
	var f link.Frame
	for i := range 100 {
		if err := l.Run(&f, 1, 0, i, counts); err != nil {
			fmt.Println(err)
			return
		}
	}
	fmt.Printf("%d bits, %d LLRs in the last frame, BER about %.2f\n", counts[0].Trials, len(f.LLR), float64(counts[0].Errors)/float64(counts[0].Trials))
	// Output: 100000 bits, 1000 LLRs in the last frame, BER about 0.01
}

func ExamplePSK() {
	fmt.Println(modem.PSK(12).Err())
	// Output: modem.PSK: M = 12 is not a power of two
}
