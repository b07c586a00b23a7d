//go:build !unix

package progress

import "io"

// termWidth is 0 (unknown) where tally does not ask the terminal.
func termWidth(io.Writer) int { return 0 }
