//go:build (darwin || freebsd || netbsd || openbsd || dragonfly) && !linux

package pdf

import "syscall"

// endWithParent does nothing here: these systems have no signal on the
// parent's death, so a browser outlives a calcdoc killed outright (a
// signal calcdoc can catch still kills its process group).
func endWithParent(a *syscall.SysProcAttr) {}
