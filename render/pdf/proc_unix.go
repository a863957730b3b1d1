//go:build linux || darwin || freebsd || netbsd || openbsd || dragonfly

package pdf

import (
	"os/exec"
	"syscall"
)

// ownProcessGroup starts cmd in a process group of its own, and makes its
// cancellation kill the whole group: Chromium starts helper processes that
// killing the first process alone would leave running.
func ownProcessGroup(cmd *exec.Cmd) {
	cmd.SysProcAttr = &syscall.SysProcAttr{Setpgid: true}
	endWithParent(cmd.SysProcAttr)
	cmd.Cancel = func() error {
		if cmd.Process == nil {
			return nil
		}
		return syscall.Kill(-cmd.Process.Pid, syscall.SIGKILL)
	}
}

// killProcessGroup kills what is left of cmd's process group after cmd has
// exited; a group that is already gone is no error.
func killProcessGroup(cmd *exec.Cmd) {
	if cmd.Process != nil {
		_ = syscall.Kill(-cmd.Process.Pid, syscall.SIGKILL)
	}
}
