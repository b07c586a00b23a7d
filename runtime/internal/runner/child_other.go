//go:build !unix

package runner

func closeOnExec(fd int) {}
