//go:build !unix

package bench

import "time"

// cpuTime is not measured on this system; the bench falls back to wall time.
func cpuTime() (time.Duration, bool) { return 0, false }
