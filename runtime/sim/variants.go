package sim

import (
	"fmt"

	"tally/runtime/internal/runner"
)

// Variants declares the variants of a design to compare, on common random numbers: a label
// axis like SweepLabels (the Link function reads p.Label(name) and builds the variant), whose
// values run on the same frames — the same source bits, the same noise, the same fades,
// frame by frame. The first label is the reference; every other variant is compared with it,
// at every point of the rest of the sweep:
//
//	x.Sweep("ebn0_db", sim.Range(0, 12, 2)...)
//	x.Variants("receiver", "selection", "MRC")
//
// Blocks share their random numbers by role (link.Roled: "source", "noise", "fading", …), not
// by position, so a variant may add or drop blocks without randomness (an equaliser, another
// detector) and still see the other's noise; a block of the script's own that draws numbers
// names its role with link.Func(…).Draws("noise"). Variants must send the same number of
// source bits per frame.
//
// Every variant gets its own rows in the table; a variant's row adds the comparison with the
// reference: the difference of the BERs and their ratio with intervals, the p-value and the
// verdict (columns diff, diff_low, diff_high, ratio, ratio_low, ratio_high, diff_p). A point
// ends when its rules are met for every variant; stop.Shown and stop.Within watch the
// comparison itself. The variants' frames are keyed by the point without the variants axis:
// a block sees that index as f.Point, the same in every variant.
func (x *Experiment) Variants(name string, labels ...string) *Experiment {
	if len(labels) < 2 {
		runner.Fail(fmt.Errorf("sim.Variants: %q has %d variant(s): a comparison needs two or more (the first is the reference)", name, len(labels)))
	}
	seen := map[string]bool{}
	for _, l := range labels {
		if seen[l] || l == "" {
			runner.Fail(fmt.Errorf("sim.Variants: %q has the variant %q twice or empty: each needs a name of its own", name, l))
		}
		seen[l] = true
	}
	for _, p := range x.spec.Params {
		if p.Paired {
			runner.Fail(fmt.Errorf("sim.Variants: the experiment already compares the variants of %q: declare one Variants, with every variant in it", p.Name))
		}
	}
	x.sweepLabels("sim.Variants", name, labels, true)
	return x
}
