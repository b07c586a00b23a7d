//go:build unix

package compile

import (
	"context"
	"os/exec"
	"syscall"
)

// buildNice is the niceness of a background build: the interpreted run it races keeps most of
// the processors (nice(1), setpriority(2)).
const buildNice = "10"

// lowPriority is the command at a lower scheduling priority (through nice, when the system has
// it), in a process group of its own that a cancelled context ends as a whole (the go command's
// compilers and linker with it).
func lowPriority(ctx context.Context, name string, args ...string) *exec.Cmd {
	var cmd *exec.Cmd
	if nice, err := exec.LookPath("nice"); err == nil {
		cmd = exec.CommandContext(ctx, nice, append([]string{"-n", buildNice, name}, args...)...)
	} else {
		cmd = exec.CommandContext(ctx, name, args...)
	}
	cmd.SysProcAttr = &syscall.SysProcAttr{Setpgid: true}
	cmd.Cancel = func() error { return syscall.Kill(-cmd.Process.Pid, syscall.SIGKILL) }
	return cmd
}
