//go:build !linux

package isolate

import "syscall"

// childAttr: elsewhere the child ends when its control pipe closes with its parent.
func childAttr() *syscall.SysProcAttr { return nil }

// residentBytes is unknown here: the child's own watch of its heap bounds the run.
func residentBytes(pid int) int64 { return 0 }

func physicalMemory() int64 { return 0 }

func yieldCPU(pid int) {}
