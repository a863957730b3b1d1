//go:build unix

package expr

import (
	"syscall"
	"time"
)

// cpuTime is the CPU time (user + system, all threads) of this process, so
// that a benchmark can report its cost on a machine shared with others.
func cpuTime() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}
