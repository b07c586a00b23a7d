package channel_test

import (
	"fmt"
	"strings"
	"testing"

	"tally/blocks/channel"
	"tally/blocks/equalize"
	"tally/blocks/fec"
	"tally/blocks/impair"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/noise"
	"tally/blocks/pulse"
	"tally/blocks/source"
)

// Links whose blocks break an estimator's assumptions are refused with the block named, and
// links that satisfy them are accepted. (The assumptions: the error rate is a Gaussian tail of
// one noise block; importance sampling weighs one symbol's noise per decision; the
// semi-analytic estimator needs a linear receiver up to a detector with known boundaries.
// Jeruchim, Balaban and Shanmugan, Simulation of Communication Systems, 2nd ed., 2000.)
func TestEstimatorRefusals(t *testing.T) {
	q := modem.QAM(16)
	b := modem.BPSK()
	h := fec.Hamming74()
	p := pulse.RRC(0.25)
	cases := []struct {
		name  string
		l     *link.Link
		est   string
		block string // "" when accepted
	}{
		{"plain AWGN", link.Chain(source.Random(64), q.Mod(), channel.AWGN(10), q.Demod()), "importance", ""},
		{"PA, IQ, phase before noise", link.Chain(source.Random(64), q.Mod(), impair.Phase(3), impair.IQ(0.5, 2), channel.AWGN(10), q.Demod()), "semi-analytic", ""},
		{"pulse-shaped", link.Chain(source.Random(64), q.Mod(), p.Shape(), channel.AWGN(10), p.Match(), pulse.Sample(), q.Demod()), "semi-analytic", ""},
		{"pulse-shaped, IS", link.Chain(source.Random(64), q.Mod(), p.Shape(), channel.AWGN(10), p.Match(), pulse.Sample(), q.Demod()), "importance", "pulse.Match"},
		{"rotation after noise", link.Chain(source.Random(64), q.Mod(), channel.AWGN(10), impair.Phase(5), q.Demod()), "importance", ""},
		{"decoder", link.Chain(source.Random(64), h.Encoder(), b.Mod(), channel.AWGN(10), b.Demod(), h.Decoder()), "importance", "fec.Hamming"},
		{"per-symbol fading", link.Chain(source.Random(64), b.Mod(), channel.Rayleigh(), channel.AWGN(10), b.Demod().CSI()), "importance", "channel.Rayleigh"},
		{"impulsive noise", link.Chain(source.Random(64), b.Mod(), noise.BernoulliGaussian(10, 0.01, 100), b.Demod()), "semi-analytic", "noise."},
		{"adaptive equaliser", link.Chain(source.Random(64), q.Mod(), channel.AWGN(10), equalize.LMS(5, 0.01), q.Demod()), "importance", "equalize"},
		{"PSK regions", link.Chain(source.Random(63), modem.PSK(8).Mod(), channel.AWGN(10), modem.PSK(8).Demod()), "semi-analytic", "PSK"},
		{"no noise", link.Chain(source.Random(64), b.Mod(), b.Demod()), "importance", "channel.AWGN"},
		{"ADC with AGC", link.Chain(source.Random(64), q.Mod(), channel.AWGN(10), impair.ADC(6), q.Demod()), "importance", "impair.ADC"},
	}
	for _, c := range cases {
		err := estimate(c.l, c.est)
		switch {
		case c.block == "" && err != nil:
			t.Errorf("%s: refused: %v", c.name, err)
		case c.block != "" && err == nil:
			t.Errorf("%s: accepted, want a refusal naming %s", c.name, c.block)
		case c.block != "" && !strings.Contains(err.Error(), c.block):
			t.Errorf("%s: %v; want %s named", c.name, err, c.block)
		}
	}
}

// estimate calls Link.Estimate and turns its panic (a script error at the line) into an error.
func estimate(l *link.Link, method string) (err error) {
	defer func() {
		if v := recover(); v != nil {
			err = fmt.Errorf("%v", v)
		}
	}()
	l.Estimate(method)
	return nil
}
