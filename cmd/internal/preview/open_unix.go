//go:build unix

package preview

import (
	"os"
	"syscall"
)

// openDoc opens a document's file for reading without blocking: a file
// replaced by a named pipe between the check that it is a regular file and
// the open would otherwise block the watcher until something writes to the
// pipe. The caller checks that the file opened is the one it looked at.
func openDoc(name string) (*os.File, error) {
	return os.OpenFile(name, os.O_RDONLY|syscall.O_NONBLOCK, 0)
}
