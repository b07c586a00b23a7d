package carrier

import (
	"testing"

	"tally/blocks/internal/linktest"
	"tally/blocks/link"
	"tally/blocks/rng"
)

// BenchmarkBlindPhase times blind phase search on a 16-QAM frame of 1024 symbols.
func BenchmarkBlindPhase(b *testing.B) {
	m := linktest.NewModem(2, 2)
	f := &link.Frame{}
	r := rng.New(1)
	_ = (&linktest.Source{N: 4096}).Process(f, r)
	_ = m.Process(f, r)
	bp := BlindPhase(32, 32)
	for b.Loop() {
		_ = bp.Process(f, r)
	}
}

// BenchmarkMPower times the M-th power estimator on a QPSK frame of 1024 symbols.
func BenchmarkMPower(b *testing.B) {
	m := linktest.NewModem(1, 1)
	f := &link.Frame{}
	r := rng.New(1)
	_ = (&linktest.Source{N: 2048}).Process(f, r)
	_ = m.Process(f, r)
	mp := MPower(32)
	for b.Loop() {
		_ = mp.Process(f, r)
	}
}
