package sim

import (
	"fmt"
	"slices"

	"tally/runtime/internal/runner"
)

// Show chooses the taps the plot (ber.png, ber.svg) and README.md show, and the progress
// line counts (the first):
//
//	x.Show("payload")          // the script's own tap, with its interval
//	x.Show("payload", "ber")   // and the whole-frame BER beside it
//
// Without Show they show what the experiment asks about: the taps its stop rules judge
// (stop.Errors(100).Tap("payload")), then those its targets cross (x.TargetOn("payload",
// 1e-5)), else the BER. The frame error rate ("fer") keeps a panel of its own beside the bit
// error rates. Every tap stays in table.csv whatever is shown. A name the link does not count
// stops the script at this line once the first point has run.
func (x *Experiment) Show(taps ...string) *Experiment {
	if len(taps) == 0 {
		runner.Fail(fmt.Errorf("sim.Show: name a tap to show (\"ber\", \"fer\", \"pre\" or one of the link's own)"))
	}
	at := x.opts.Here()
	for _, t := range taps {
		if !isColumnName(t) {
			runner.Fail(fmt.Errorf("sim.Show: tap name %q must be letters, digits and _ (the names the link's taps have)", t))
		}
		if slices.Contains(x.spec.Show, t) {
			continue
		}
		x.spec.Show = append(x.spec.Show, t)
		x.spec.NameTap("sim.Show", at, t)
	}
	return x
}
