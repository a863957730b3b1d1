//go:build !unix

package expr

import "time"

// cpuTime is not measured on this system: BenchmarkStatements reports 0.
func cpuTime() time.Duration { return 0 }
