//go:build unix

package progress

import (
	"io"
	"os"

	"golang.org/x/sys/unix"
)

// termWidth asks the terminal behind w for its width in columns; 0 when it cannot tell.
func termWidth(w io.Writer) int {
	f, ok := w.(*os.File)
	if !ok {
		return 0
	}
	ws, err := unix.IoctlGetWinsize(int(f.Fd()), unix.TIOCGWINSZ)
	if err != nil {
		return 0
	}
	return int(ws.Col)
}
