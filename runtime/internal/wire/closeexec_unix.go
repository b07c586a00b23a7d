//go:build unix

package wire

import "syscall"

func closeOnExec(fd int) { syscall.CloseOnExec(fd) }
