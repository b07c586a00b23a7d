package fec_test

import (
	"fmt"

	"tally/blocks/channel"
	"tally/blocks/fec"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/source"
)

func ExampleLDPCPEG() {
	// A rate-1/2 LDPC code of length 2048 built by progressive edge growth, decoded by layered
	// normalised min-sum on BPSK LLRs at Eb/N0 = 2.5 dB; the decoder's counters are taps.
	c := fec.LDPCPEG(2048, 1024, 3)
	m := modem.BPSK()
	dec := c.Decoder().MinSum(0.75).Layer()
	l := link.Chain(source.Random(4*1024), c.Encoder(), m.Mod(), channel.AWGN(2.5), m.Demod().LogMAP(), dec)
	l.Count("failed", dec.Failures).Count("iterations", dec.IterationsUsed)
	r, _ := rates(l, 10)
	fmt.Println(l.Taps())
	fmt.Printf("N %d, K %d, %d ones in H; decoded BER below 1e-4: %v; mean iterations below 10: %v\n",
		c.N, c.K, c.Edges(), r[link.TapBER] < 1e-4, r["iterations"]*50 < 10)
	// Output:
	// [ber fer pre failed iterations]
	// N 2048, K 1024, 6140 ones in H; decoded BER below 1e-4: true; mean iterations below 10: true
}

func ExampleLDPCAlist() {
	// A matrix in the alist format: in a script, x.ReadFile("codes/mine.alist") gives the text.
	c := fec.LDPCAlist("7 3\n3 4\n1 1 1 2 2 3 2\n4 4 4\n1\n2\n3\n1 2\n2 3\n1 2 3\n1 3\n1 4 6 7\n2 4 5 6\n3 5 6 7\n")
	fmt.Println(c.Err(), c.N, c.K, c.Rate())
	fmt.Println(fec.LDPCAlist("7 3\n3 4\n1 1\n").Err())
	// Output:
	// <nil> 7 4 0.5714285714285714
	// fec.LDPCAlist: alist line 3: 2 column weights for N = 7
}

func ExamplePolar() {
	// A (1024, 512) polar code with a CRC-16, CRC-aided list decoding with L = 8, at 2.5 dB.
	c := fec.Polar(1024, 512).CRC(16)
	m := modem.BPSK()
	dec := c.Decoder().List(8)
	l := link.Chain(source.Random(512), c.Encoder(), m.Mod(), channel.AWGN(2.5), m.Demod().LogMAP(), dec)
	r, _ := rates(l.Count("crc_failed", dec.CRCFailures), 20)
	fmt.Println(dec.Name())
	fmt.Printf("rate %.2f; FER below 0.1: %v; SC estimate at 2.5 dB %.1e\n", c.Rate(), r[link.TapFER] < 0.1, c.EstimateSC(2.5))
	// Output:
	// fec.Polar(1024, 512) SC list decoder (L = 8, CRC-16)
	// rate 0.50; FER below 0.1: true; SC estimate at 2.5 dB 2.7e-02
}

func ExampleBCH() {
	// BCH(255, 239) (t = 2) as the outer code of a rate-1/2 LDPC code: the BCH decoder cleans up
	// the few bits the LDPC decoder leaves wrong. Eight BCH words make the LDPC message.
	bch, ldpc := fec.BCH(255, 239), fec.LDPCPEG(4080, 2040, 3)
	m := modem.BPSK()
	outer := bch.Decoder()
	l := link.Chain(source.Random(8*239), bch.Encoder(), ldpc.Encoder(), m.Mod(), channel.AWGN(2.5),
		m.Demod().LogMAP(), ldpc.Decoder().Layer(), outer)
	r, f := rates(l.Count("bch_detected", outer.Detected), 5)
	fmt.Printf("t = %d, code rate %.3f, decoded BER %.0g\n", bch.T, f.CodeRate, r[link.TapBER])
	// Output:
	// t = 2, code rate 0.469, decoded BER 0
}
