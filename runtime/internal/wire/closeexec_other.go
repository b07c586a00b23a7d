//go:build !unix

package wire

func closeOnExec(fd int) {}
