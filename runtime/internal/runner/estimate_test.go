package runner

import (
	"strings"
	"testing"

	"tally/blocks/channel"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/noise"
	"tally/blocks/pulse"
	"tally/blocks/source"
	"tally/blocks/stop"
)

// "auto" gives each link the exact semi-analytic estimator where its assumptions hold,
// importance sampling where only those hold, and counting otherwise; a link's own choice and
// an explicit estimator win. (Which estimator holds where: Jeruchim, Balaban and Shanmugan,
// Simulation of Communication Systems, 2nd ed., 2000; see link.Estimator.)
func TestEstimateAuto(t *testing.T) {
	q, p := modem.QAM(16), modem.PSK(8)
	r := pulse.RRC(0.3)
	cases := []struct {
		l    *link.Link
		want link.Estimator
	}{
		{link.Chain(source.Random(64), q.Mod(), channel.AWGN(10), q.Demod()), link.SemiAnalytic},
		{link.Chain(source.Random(64), q.Mod(), r.Shape(), channel.AWGN(10), r.Match(), pulse.Sample(), q.Demod()), link.SemiAnalytic},
		{link.Chain(source.Random(63), p.Mod(), channel.AWGN(10), p.Demod()), link.Importance},
		{link.Chain(source.Random(64), q.Mod(), noise.Laplacian(10), q.Demod()), link.Count},
		{link.Chain(source.Random(64), q.Mod(), channel.AWGN(10), q.Demod()).Estimate("importance"), link.Importance},
	}
	x := &experiment{Spec: &Spec{AutoEstimate: true}}
	for i, c := range cases {
		x.estimateOn(c.l)
		if got := c.l.Estimator(); got != c.want {
			t.Errorf("link %d: %s, want %s", i, got, c.want)
		}
	}
	x.AutoEstimate, x.Estimator = false, link.Importance
	l := link.Chain(source.Random(64), q.Mod(), channel.AWGN(10), q.Demod())
	x.estimateOn(l)
	if l.Estimator() != link.Importance {
		t.Errorf("explicit importance: %s", l.Estimator())
	}
}

// Under an estimator, rules that could never be met are refused before the run.
func TestEstimateRefusesRules(t *testing.T) {
	q := modem.QAM(16)
	for _, r := range []stop.Rule{stop.Errors(10).Tap(link.TapFER), stop.Below(1e-9), stop.Above(1e-3)} {
		x := &experiment{Spec: &Spec{Rules: []stop.Rule{r, stop.Bits(1e6)}, Estimator: link.Importance}}
		err := func() (err error) {
			defer func() {
				if v := recover(); v != nil {
					err, _ = v.(error)
				}
			}()
			x.estimateOn(link.Chain(source.Random(64), q.Mod(), channel.AWGN(10), q.Demod()))
			return nil
		}()
		if err == nil || !strings.Contains(err.Error(), "cannot be judged") {
			t.Errorf("%s: %v", r.Name(), err)
		}
	}
}
