//go:build !unix

package fec_test

import "time"

var cpuStart = time.Now()

// cpuTime falls back to wall time where the process's CPU time is not at hand.
func cpuTime() time.Duration { return time.Since(cpuStart) }
