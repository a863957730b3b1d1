//go:build !(linux || darwin || freebsd || netbsd || openbsd || dragonfly)

package pdf

import "os/exec"

// ownProcessGroup leaves cmd as it is: this system has no process groups to
// start Chromium in, so cancellation kills its first process only.
func ownProcessGroup(cmd *exec.Cmd) {}

// killProcessGroup does nothing where there are no process groups.
func killProcessGroup(cmd *exec.Cmd) {}
