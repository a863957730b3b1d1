//go:build unix

package build

import "syscall"

// processRuns reports whether a process with this id exists.
func processRuns(pid int) bool {
	err := syscall.Kill(pid, 0)
	return err == nil || err == syscall.EPERM
}
