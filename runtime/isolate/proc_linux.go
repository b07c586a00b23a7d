package isolate

import (
	"os"
	"strconv"
	"strings"
	"syscall"
)

// childAttr makes the kernel kill the child when its parent dies, whatever the way.
func childAttr() *syscall.SysProcAttr {
	return &syscall.SysProcAttr{Pdeathsig: syscall.SIGKILL}
}

// residentBytes is the resident memory of a process (0 when unknown).
func residentBytes(pid int) int64 {
	b, err := os.ReadFile("/proc/" + strconv.Itoa(pid) + "/statm")
	if err != nil {
		return 0
	}
	f := strings.Fields(string(b))
	if len(f) < 2 {
		return 0
	}
	pages, _ := strconv.ParseInt(f[1], 10, 64)
	return pages * int64(os.Getpagesize())
}

// physicalMemory is the machine's memory in bytes (0 when unknown), or the container's limit
// when that is lower.
func physicalMemory() int64 {
	var si syscall.Sysinfo_t
	if syscall.Sysinfo(&si) != nil {
		return 0
	}
	n := int64(si.Totalram) * int64(si.Unit)
	if b, err := os.ReadFile("/sys/fs/cgroup/memory.max"); err == nil {
		if v, err := strconv.ParseInt(strings.TrimSpace(string(b)), 10, 64); err == nil && v > 0 && v < n {
			n = v
		}
	}
	return n
}

// yieldCPU lowers the scheduling priority of every thread of a process to the lowest
// (niceness 19; threads it starts later inherit it), so a build beside it gets the processors.
func yieldCPU(pid int) {
	tasks, err := os.ReadDir("/proc/" + strconv.Itoa(pid) + "/task")
	if err != nil {
		return
	}
	for _, t := range tasks {
		if tid, err := strconv.Atoi(t.Name()); err == nil {
			syscall.Setpriority(syscall.PRIO_PROCESS, tid, 19)
		}
	}
}
