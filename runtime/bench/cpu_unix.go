//go:build unix

package bench

import (
	"syscall"
	"time"
)

// cpuTime is the CPU time (user and system) the process has used so far. On a shared machine
// it counts only the time the bench actually ran, so ratios measured by it are steadier than
// wall-clock ones.
func cpuTime() (time.Duration, bool) {
	var u syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &u); err != nil {
		return 0, false
	}
	return time.Duration(u.Utime.Nano() + u.Stime.Nano()), true
}
