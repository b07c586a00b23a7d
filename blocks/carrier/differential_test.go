package carrier

import (
	"testing"

	"tally/blocks/channel"
	"tally/blocks/impair"
	"tally/blocks/internal/linktest"
	"tally/blocks/modem"
	"tally/blocks/theory"
)

// The combination the package doc recommends against ambiguity and slips: with a random
// starting phase, coherent QPSK behind M-th power recovery is turned by a multiple of 90° in
// about three frames of four (BER near 1/2 on those), while DQPSK behind the same recovery
// stays within 0.5 dB of its differential-detection theory, Pb = Q1(a, b) − ½I0(ab)e^{−(a²+b²)/2}
// (Proakis, Digital Communications, 4th ed., 2001, ch. 5, as evaluated by theory.DQPSK).
func TestDifferentialAgainstAmbiguity(t *testing.T) {
	const db = 8.0
	src := &linktest.Source{N: 4096}
	pn := impair.PhaseNoise(1e-4).RandomStart()

	d := modem.DQPSK()
	e, n := linktest.BER(t, 41, 40, src, d.Mod(), pn, channel.AWGN(db), MPower(32), d.Demod())
	closeToIdeal(t, "DQPSK behind recovery, random start", e, n, theory.DQPSK(db), theory.DQPSK(db-0.5))

	q := linktest.NewModem(1, 1)
	e, n = linktest.BER(t, 41, 40, src, q, pn, channel.AWGN(db), MPower(32), q.Demod())
	if r := float64(e) / float64(n); r < 0.1 {
		t.Errorf("coherent QPSK behind recovery with a random start: BER %.3g, expected the ambiguity to show", r)
	}
}
