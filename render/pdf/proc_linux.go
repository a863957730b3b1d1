//go:build linux

package pdf

import "syscall"

// endWithParent has the kernel kill the browser when calcdoc ends, even
// when calcdoc is killed outright and cannot kill the group itself.
func endWithParent(a *syscall.SysProcAttr) { a.Pdeathsig = syscall.SIGKILL }
