package modem_test

import (
	"testing"

	"tally/blocks/channel"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/source"
)

// benchLink runs frames of 4080 bits through source, m, AWGN at 6 dB and the detector.
func benchLink(b *testing.B, m *modem.Modem, det *modem.Detector) {
	l := link.Chain(source.Random(4080), m.Mod(), channel.AWGN(6), det)
	counts := make([]link.Tally, len(l.Taps()))
	var f link.Frame
	b.SetBytes(4080)
	b.ReportAllocs()
	for i := 0; b.Loop(); i++ {
		if err := l.Run(&f, 1, 0, i, counts); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkBPSKHard(b *testing.B)    { m := modem.BPSK(); benchLink(b, m, m.Demod()) }
func BenchmarkQPSKHard(b *testing.B)    { m := modem.QPSK(); benchLink(b, m, m.Demod()) }
func BenchmarkQAM64Hard(b *testing.B)   { m := modem.QAM(64); benchLink(b, m, m.Demod()) }
func BenchmarkQAM64LogMAP(b *testing.B) { m := modem.QAM(64); benchLink(b, m, m.Demod().LogMAP()) }
func BenchmarkQAM64MaxLog(b *testing.B) { m := modem.QAM(64); benchLink(b, m, m.Demod().MaxLog()) }
func BenchmarkPSK8Hard(b *testing.B)    { m := modem.PSK(8); benchLink(b, m, m.Demod()) }
func BenchmarkPSK8LogMAP(b *testing.B)  { m := modem.PSK(8); benchLink(b, m, m.Demod().LogMAP()) }
func BenchmarkDQPSKHard(b *testing.B)   { m := modem.DQPSK(); benchLink(b, m, m.Demod()) }

// benchBlock runs one block alone on a fixed frame of 4080 bits that went through source, the
// modulator, AWGN at 6 dB and a detector once; blk is the block under test (a modulator or
// detector).
func benchBlock(b *testing.B, m *modem.Modem, blk link.Block) {
	var f link.Frame
	l := link.Chain(source.Random(4080), m.Mod(), channel.AWGN(6), m.Demod())
	if err := l.Run(&f, 1, 0, 0, make([]link.Tally, len(l.Taps()))); err != nil {
		b.Fatal(err)
	}
	b.SetBytes(4080)
	b.ReportAllocs()
	for b.Loop() {
		if err := blk.Process(&f, nil); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkBPSKMod(b *testing.B)      { m := modem.BPSK(); benchBlock(b, m, m.Mod()) }
func BenchmarkQAM64Decide(b *testing.B)  { m := modem.QAM(64); benchBlock(b, m, m.Demod()) }
func BenchmarkQAM256Decide(b *testing.B) { m := modem.QAM(256); benchBlock(b, m, m.Demod()) }
func BenchmarkPAM8Decide(b *testing.B)   { m := modem.PAM(8); benchBlock(b, m, m.Demod()) }
