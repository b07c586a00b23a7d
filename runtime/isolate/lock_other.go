//go:build !unix

package isolate

import "os"

// lockFile opens path; without advisory locks here, a second run is not kept out.
func lockFile(path string) (*os.File, error) {
	return os.OpenFile(path, os.O_RDWR|os.O_CREATE, 0o644)
}
