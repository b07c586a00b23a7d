//go:build ignore

// Hilltop repeater, order-wire channel: the demo capture of tally count. The repeater's FPGA
// receiver recorded 90 s of its 64 kbit/s service channel while the far end sent the O.150
// PRBS 2^15−1 (inverted, as O.150 sends it). The scenario is invented; what happened during
// the capture, and hence what tally count must find, is written below:
//
//	throughout    independent bit errors at BER 2e-5 (receiver noise)
//	20 s – 34 s   a rain fade: BER 4e-3, fourteen severely errored seconds → unavailable time
//	47.3 s        the clock recovery drops a bit: slip +1
//	58.2 s        a switching transient: 61 bits, every other one wrong
//	65.5 s        a buffer underrun loses 37 bits: slip +37
//	72.8 s        the clock recovery repeats a bit: slip −1
//
// Run from the repository's top folder:
//
//	go run experiments/lab/generate.go      # writes experiments/lab/hilltop.bin (720 000 bytes)
//	go run ./cmd/tally count -prbs 15 -rate 64k -block 640 -ber 1e-4 -o experiments/lab/hilltop experiments/lab/hilltop.bin
package main

import (
	"fmt"
	"math/rand/v2"
	"os"

	"tally/blocks/link"
	"tally/blocks/source"
)

const (
	rate    = 64_000
	seconds = 90
)

func main() {
	n := rate*seconds + 64 // a little more pattern than needed: the slips use some up
	s := source.PRBS(15, n)
	f := &link.Frame{}
	if err := s.Process(f, nil); err != nil {
		panic(err)
	}
	sent := f.Bits
	r := rand.New(rand.NewPCG(2026, 15))

	at := func(t float64) int { return int(t * rate) }
	// the capture: sent bits with the slips applied
	var got []byte
	pos := 0
	copyTo := func(end int) { got = append(got, sent[pos:end]...); pos = end }
	copyTo(at(47.3))
	pos++ // a bit dropped
	copyTo(at(65.5))
	pos += 37 // 37 bits lost
	copyTo(at(72.8))
	got = append(got, sent[pos-1]) // a bit repeated
	copyTo(pos + (rate*seconds - len(got)))

	// errors by capture position
	injected := 0
	for i := range got {
		p := 2e-5
		if i >= at(20) && i < at(34) {
			p = 4e-3
		}
		if r.Float64() < p {
			got[i] ^= 1
			injected++
		}
	}
	for i := at(58.2); i < at(58.2)+61; i += 2 {
		got[i] ^= 1
		injected++
	}

	out := make([]byte, len(got)/8)
	for i, b := range got {
		out[i/8] |= b << (7 - i%8)
	}
	if err := os.WriteFile("experiments/lab/hilltop.bin", out, 0o644); err != nil {
		panic(err)
	}
	fmt.Printf("wrote experiments/lab/hilltop.bin: %d bits, %d errors injected (the slips and the lost bits come on top)\n", len(got), injected)
}
