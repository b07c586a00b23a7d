//go:build unix

package cdp

import (
	"os/exec"
	"syscall"
)

// ownGroup puts the browser in a process group of its own, so that ending it ends its helper
// processes too.
func ownGroup(cmd *exec.Cmd) { cmd.SysProcAttr = &syscall.SysProcAttr{Setpgid: true} }

// kill ends the browser's process group.
func kill(cmd *exec.Cmd) {
	if cmd.Process != nil {
		syscall.Kill(-cmd.Process.Pid, syscall.SIGKILL)
	}
}
