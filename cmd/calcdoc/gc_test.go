package main

import (
	"math"
	"runtime/debug"
	"testing"
)

// The collector setting (gc.go), read back through runtime/debug, whose
// SetGCPercent and SetMemoryLimit return the setting they replace (Go's
// documentation of runtime/debug).
func TestTuneGC(t *testing.T) {
	pct := debug.SetGCPercent(100)
	lim := debug.SetMemoryLimit(math.MaxInt64)
	t.Cleanup(func() { debug.SetGCPercent(pct); debug.SetMemoryLimit(lim) })

	for _, env := range []struct{ name, value string }{{"GOGC", "200"}, {"GOMEMLIMIT", "1GiB"}} {
		t.Run("user sets "+env.name, func(t *testing.T) {
			t.Setenv("GOGC", "")
			t.Setenv("GOMEMLIMIT", "")
			t.Setenv(env.name, env.value)
			tuneGC()
			if p, l := debug.SetGCPercent(100), debug.SetMemoryLimit(math.MaxInt64); p != 100 || l != math.MaxInt64 {
				t.Errorf("with %s set the command changed the collector: GOGC %d, limit %d", env.name, p, l)
			}
		})
	}
	t.Run("default", func(t *testing.T) {
		t.Setenv("GOGC", "")
		t.Setenv("GOMEMLIMIT", "")
		tuneGC()
		if p, l := debug.SetGCPercent(100), debug.SetMemoryLimit(math.MaxInt64); p != -1 || l != gcSoftLimit {
			t.Errorf("GOGC %d, limit %d; want off (-1) below %d", p, l, gcSoftLimit)
		}
	})
}
