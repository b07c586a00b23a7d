//go:build unix

package compile

import (
	"context"
	"os/exec"
	"syscall"
)

// grouped is the command in a process group of its own, which a cancelled context ends as a
// whole (the go command's compilers and linker with it). It runs at the normal priority: the
// interpreted run beside it yields the processors instead (runtime/isolate), since once the
// build is done the compiled script does the run's work many times faster.
func grouped(ctx context.Context, name string, args ...string) *exec.Cmd {
	cmd := exec.CommandContext(ctx, name, args...)
	cmd.SysProcAttr = &syscall.SysProcAttr{Setpgid: true}
	cmd.Cancel = func() error { return syscall.Kill(-cmd.Process.Pid, syscall.SIGKILL) }
	return cmd
}
