package impair

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"tally/blocks/channel"
	"tally/blocks/internal/linktest"
	"tally/blocks/link"
	"tally/blocks/rng"
)

// zeroed is every block with its impairment switched off.
func zeroed() []link.Block {
	return []link.Block{
		Phase(0), Frequency(0), PhaseNoise(0), IQ(0, 0), DC(0, 0),
		Rapp(math.Inf(1), 2), Saleh(math.Inf(1)), Cubic(math.Inf(1)), ADC(0),
	}
}

// Switched off, every block is the identity: the frame's samples are untouched, bit for bit.
func TestZeroIsIdentity(t *testing.T) {
	for _, b := range zeroed() {
		f := &link.Frame{SPS: 1, Es: 1, Samples: make([]complex128, 64)}
		want := make([]complex128, 64)
		r := rng.New(3)
		r.AddNoise(f.Samples, 1)
		copy(want, f.Samples)
		if err := b.Process(f, rng.New(4)); err != nil {
			t.Fatal(err)
		}
		for i := range want {
			if f.Samples[i] != want[i] {
				t.Fatalf("%s: sample %d changed from %v to %v", link.NameOf(b), i, want[i], f.Samples[i])
			}
		}
	}
}

// With its impairment at zero, each block in a QPSK and a BPSK link leaves the BER at AWGN
// theory, Pb = Q(√(2Eb/N0)), within the 99 % Clopper–Pearson interval.
func TestZeroMatchesAWGN(t *testing.T) {
	const db = 4.0
	src := &linktest.Source{N: 4096}
	for _, bps := range []int{1, 2} {
		m := linktest.NewModem(1, bps-1)
		for k, b := range zeroed() {
			e, n := linktest.BER(t, uint64(100+k), 25, src, m, channel.AWGN(db), b, m.Demod())
			linktest.Within(t, fmt.Sprintf("%s, %d bit/symbol", link.NameOf(b), bps), e, n, linktest.BERQPSK(db))
		}
	}
}

// A block that mixes I and Q first completes a real-axis signal's noise: after it the frame
// is complex and the imaginary part carries the pending N0/2.
func TestMixingCompletesNoise(t *testing.T) {
	const n = 20000
	for _, b := range []link.Block{Phase(1), Frequency(1e-9), PhaseNoise(1e-12), IQ(0.1, 0), Rapp(20, 2), ADC(14)} {
		f := &link.Frame{SPS: 1, Es: 1, Real: true, Samples: make([]complex128, n)}
		for i := range f.Samples {
			f.Samples[i] = 1
		}
		f.PendingImagSigma = 0.5
		if err := b.Process(f, rng.New(9)); err != nil {
			t.Fatal(err)
		}
		if f.Real || f.PendingImagSigma != 0 {
			t.Fatalf("%s: frame still real (pending %v)", link.NameOf(b), f.PendingImagSigma)
		}
		var s2 float64
		for _, y := range f.Samples {
			s2 += imag(y) * imag(y)
		}
		// 0.25 ± 5 standard errors of a sample variance (√(2/n)·σ² ≈ 0.0025), wide enough
		// for the small rotations of the blocks above.
		if v := s2 / n; math.Abs(v-0.25) > 0.02 {
			t.Errorf("%s: imaginary variance %.4f, want 0.25", link.NameOf(b), v)
		}
	}
}

// Bad parameters are reported with the block, the parameter and the value.
func TestErrors(t *testing.T) {
	for _, c := range []struct {
		b    link.Checked
		want string
	}{
		{Phase(math.NaN()), "impair.Phase: offset NaN"},
		{Frequency(math.Inf(1)), "impair.Frequency: f·T = +Inf"},
		{PhaseNoise(-1), "impair.PhaseNoise: Δν·T = -1"},
		{IQ(0, 90), "impair.IQ: phase imbalance 90"},
		{IQ(math.NaN(), 0), "impair.IQ: gain imbalance NaN"},
		{DC(math.NaN(), 0), "impair.DC: offset NaN"},
		{Rapp(3, 0), "impair.Rapp: smoothness p = 0"},
		{Saleh(math.NaN()), "impair.Saleh: back-off NaN"},
		{PA(3, RappCurve{P: 2, Sat: -1}), "impair.PA: saturation -1"},
		{PA(3, nil), "impair.PA: no amplifier curve"},
		{ADC(31), "impair.ADC: bits = 31"},
		{ADC(8).Load(math.NaN()), "impair.ADC: loading factor NaN"},
		{ADC(8).FullScale(-2), "impair.ADC: full scale -2"},
	} {
		err := c.b.Err()
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("got %v, want a message containing %q", err, c.want)
		}
	}
	for _, b := range zeroed() {
		if err := b.(link.Checked).Err(); err != nil {
			t.Errorf("%s: %v", link.NameOf(b), err)
		}
	}
}
