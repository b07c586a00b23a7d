package sim

import "tally/runtime/result"

// findTargets fills run.Targets: the swept value where each target is crossed, per curve.
func (x *Experiment) findTargets(run *result.Run) {}
