//go:build unix

package main

import (
	"os"
	"runtime"
	"syscall"
)

// maxRSS is the largest resident set size, in bytes, of an exited process
// and of the children it waited for, from the rusage that wait4 returns
// (Maxrss: kibibytes on Linux and the BSDs, bytes on macOS).
func maxRSS(ps *os.ProcessState) int64 {
	ru, ok := ps.SysUsage().(*syscall.Rusage)
	if !ok {
		return 0
	}
	if runtime.GOOS == "darwin" || runtime.GOOS == "ios" {
		return int64(ru.Maxrss)
	}
	return int64(ru.Maxrss) * 1024
}
