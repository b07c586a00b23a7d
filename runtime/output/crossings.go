package output

import "tally/runtime/result"

// Crossings are the run's targets as README.md words them, one line each: where each curve
// crosses its target and the interval of that crossing, or why the sweep does not bracket it.
func Crossings(r *result.Run) []string {
	lines := make([]string, len(r.Targets))
	for i, t := range r.Targets {
		lines[i] = targetLine(r, t)
	}
	return lines
}
