package channel_test

import (
	"testing"

	"tally/blocks/channel"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/source"
	"tally/blocks/stats"
	"tally/blocks/theory"
)

// BenchmarkLowBERTargets runs the targets as benchmarks (not timed assertions): for
// BPSK at 1e-9 and 1e-12 and Gray 16-QAM at 1e-9 (theory: Q(√(2Eb/N0)), Proakis, Digital
// Communications, 5th ed., 2008, eq. 4.3-13; Cho and Yoon, IEEE Trans. Commun., 2002) it runs
// frames of 256 symbols by importance sampling until the 95 % interval lies within ±20 % of
// theory, and reports the symbols that took ("symbols/point"; the target is ≤ 1e8) beside the
// time per point.
func BenchmarkLowBERTargets(b *testing.B) {
	qam := func(x float64) float64 { return theory.QAM(16, x) }
	for _, c := range []struct {
		name string
		m    *modem.Modem
		ber  func(float64) float64
		p    float64
	}{
		{"BPSK-1e-9", modem.BPSK(), theory.BPSK, 1e-9},
		{"BPSK-1e-12", modem.BPSK(), theory.BPSK, 1e-12},
		{"16QAM-1e-9", modem.QAM(16), qam, 1e-9},
	} {
		b.Run(c.name, func(b *testing.B) {
			db := ebn0For(c.ber, c.p)
			want := c.ber(db)
			l := link.Chain(source.Random(256*c.m.Bits), c.m.Mod(), channel.AWGN(db), c.m.Demod()).Estimate("importance")
			var f link.Frame
			cnt := make([]link.Tally, len(l.Taps()))
			var symbols float64
			seed := uint64(0)
			for b.Loop() {
				seed++
				var sum link.Tally
				for i := 0; ; i++ {
					clear(cnt)
					if err := l.Run(&f, seed, 0, i, cnt); err != nil {
						b.Fatal(err)
					}
					sum.Add(cnt[0])
					if i < stats.MinFrames {
						continue
					}
					e, _ := stats.Weighted(sum, 0.95)
					if !e.Degenerate && e.Low >= 0.8*want && e.High <= 1.2*want {
						break
					}
				}
				symbols += float64(sum.Trials / int64(c.m.Bits))
			}
			b.ReportMetric(symbols/float64(b.N), "symbols/point")
		})
	}
}
