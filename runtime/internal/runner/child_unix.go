//go:build unix

package runner

import "syscall"

func closeOnExec(fd int) { syscall.CloseOnExec(fd) }
