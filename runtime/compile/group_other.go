//go:build !unix

package compile

import (
	"context"
	"os/exec"
)

func grouped(ctx context.Context, name string, args ...string) *exec.Cmd {
	return exec.CommandContext(ctx, name, args...)
}
