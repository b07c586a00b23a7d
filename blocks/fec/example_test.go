package fec_test

import (
	"fmt"

	"tally/blocks/channel"
	"tally/blocks/fec"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/source"
)

// rates runs frames through a link and returns each tap's error rate, and the last frame.
func rates(l *link.Link, frames int) (map[string]float64, *link.Frame) {
	if err := l.Check(); err != nil {
		fmt.Println(err)
		return nil, nil
	}
	counts := make([]link.Tally, len(l.Taps()))
	var f link.Frame
	for i := range frames {
		if err := l.Run(&f, 1, 0, i, counts); err != nil {
			fmt.Println(err)
			return nil, nil
		}
	}
	r := map[string]float64{}
	for i, tap := range l.Taps() {
		r[tap] = float64(counts[i].Errors) / float64(counts[i].Trials)
	}
	return r, &f
}

func ExampleConv() {
	// The K = 7 code with soft-decision Viterbi decoding on QPSK at Eb/N0 = 3 dB. The encoder
	// sets the frame's code rate, so channel.AWGN's Eb/N0 is per information bit; the "pre" tap
	// counts the demodulator's decisions on the coded bits.
	c := fec.Conv()
	m := modem.QPSK()
	r, f := rates(link.Chain(source.Random(1000), c.Encoder(), m.Mod(), channel.AWGN(3), m.Demod().LogMAP(), c.Decoder()), 100)
	fmt.Printf("code rate %.4f (1000 bits + 6 tail bits)\n", f.CodeRate)
	fmt.Printf("pre-FEC BER %.2f, decoded BER below 1e-3: %v\n", r[link.TapPre], r[link.TapBER] < 1e-3)
	// Output:
	// code rate 0.4970 (1000 bits + 6 tail bits)
	// pre-FEC BER 0.08, decoded BER below 1e-3: true
}

func ExampleConvolutional_Puncture() {
	// Rate 3/4 by the IEEE 802.11a pattern, with a random interleaver between the coder and the
	// modulator (as 802.11a interleaves the punctured bits). The deinterleaver comes right after
	// the demodulator and the Viterbi decoder after it.
	c, il := fec.Conv().Puncture("3/4"), fec.RandomInterleaver()
	m := modem.QPSK()
	r, f := rates(link.Chain(source.Random(1200), c.Encoder(), il.Interleave(), m.Mod(), channel.AWGN(6),
		m.Demod().MaxLog(), il.Deinterleave(), c.Decoder()), 20)
	fmt.Printf("rate %.2f: %d sent bits for 1200, decoded BER below 1e-3: %v\n", c.Rate(), len(f.Hard), r[link.TapBER] < 1e-3)
	// Output:
	// rate 0.75: 1608 sent bits for 1200, decoded BER below 1e-3: true
}

func ExampleHamming84() {
	// The extended Hamming code with hard decisions; its decoder's Detected counter reports the
	// words it found uncorrectable (double errors), as a tap of the link's own.
	h := fec.Hamming84()
	m := modem.BPSK()
	dec := h.Decoder()
	l := link.Chain(source.Random(400), h.Encoder(), m.Mod(), channel.AWGN(4), m.Demod(), dec)
	r, _ := rates(l.Count("detected", dec.Detected), 50)
	fmt.Println(l.Taps())
	fmt.Printf("decoded BER below pre-FEC BER: %v; some words detected: %v\n", r[link.TapBER] < r[link.TapPre], r["detected"] > 0)
	// Output:
	// [ber fer pre detected]
	// decoded BER below pre-FEC BER: true; some words detected: true
}

func ExampleRS() {
	// DVB-S's outer code RS(204, 188) around the K = 7 inner code punctured to 3/4, with a byte
	// interleaver between them (4 codewords per frame, one per row): the decoders come in the
	// reverse order of the encoders, and the deinterleaver between the two decoders works on the
	// inner decoder's output.
	rs, il, cc := fec.RS(204, 188), fec.BlockInterleaver(4, 204).Group(8), fec.Conv().Puncture("3/4")
	m := modem.QPSK()
	r, f := rates(link.Chain(source.Random(4*188*8), rs.Encoder(), il.Interleave(), cc.Encoder(), m.Mod(), channel.AWGN(4.5),
		m.Demod().LogMAP(), cc.Decoder(), il.Deinterleave(), rs.Decoder()), 10)
	fmt.Printf("code rate %.3f, decoded BER below 1e-4: %v\n", f.CodeRate, r[link.TapBER] < 1e-4)
	// Output:
	// code rate 0.691, decoded BER below 1e-4: true
}

func ExampleBlockInterleaver() {
	fmt.Println(fec.BlockInterleaver(0, 4).Err())
	fmt.Println(fec.RS(204, 187).Err())
	// Output:
	// fec.BlockInterleaver(0, 4): rows = 0 and cols = 4 must be at least 1
	// fec.RS(204, 187): n − k = 17 must be even
}
