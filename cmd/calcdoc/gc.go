package main

import (
	"math"
	"os"
	"runtime"
	"runtime/debug"
)

// The garbage collector setting of the command (docs/performance.md,
// "Garbage collector setting").
//
// A build lives a fraction of a second, and most of what it allocates (the
// evaluated document and its sheet) stays live until the sheet is written:
// a collection mostly finds nothing to free. So the collector is off
// (GOGC=off) below a soft memory limit of gcSoftLimit: a document whose
// heap stays below it (the 20,000-statement document of cmd/calcbench,
// whose sheet goes into its file as it is drawn and is never held whole,
// render.WriteSheet) runs without a single collection. A larger document reaches the limit, and the runtime
// collects to stay under it. When a collection leaves more than half the
// limit live, collecting to the limit would soon run without pause, so the
// collector is handed back to Go's default proportional target
// (gcPercentAbove: the heap may grow by its live size before the next
// collection) with no limit. Peak memory is then at most about twice the
// live heap, not the five times of the earlier SetGCPercent(400), and a
// small document never pays for a collection. (Measured in
// docs/performance.md, "Garbage collector setting": at 20,000 statements
// the collections after the limit cost about a tenth more CPU time than
// GOGC=400, and a target of 200 or 400 above the limit gave no lower
// peak.)
//
// GOGC or GOMEMLIMIT in the environment is the user's choice: then the
// command changes nothing.
const (
	gcSoftLimit    = 64 << 20
	gcPercentAbove = 100
)

// tuneGC applies the setting above unless the user set GOGC or GOMEMLIMIT.
func tuneGC() {
	if userGC() {
		return
	}
	debug.SetGCPercent(-1)
	debug.SetMemoryLimit(gcSoftLimit)
	watchGC()
}

// userGC reports whether the user set the collector (GOGC or GOMEMLIMIT
// in the environment): then the command changes nothing, and `watch`
// does not collect when idle either (preview.Config.CollectWhenIdle).
func userGC() bool { return os.Getenv("GOGC") != "" || os.Getenv("GOMEMLIMIT") != "" }

// watchGC runs after each collection (a cleanup of an object nobody
// holds runs once a collection has found it unreachable) and hands the
// collector back to a proportional target once the live heap passes half
// the soft limit.
func watchGC() {
	sentinel := new([16]byte)
	runtime.AddCleanup(sentinel, func(struct{}) {
		if liveHeap() > gcSoftLimit/2 {
			debug.SetGCPercent(gcPercentAbove)
			debug.SetMemoryLimit(math.MaxInt64)
			return
		}
		watchGC()
	}, struct{}{})
}

// liveHeap is the heap in use just after a collection: what it left
// live, and the little allocated since. (runtime.ReadMemStats rather
// than runtime/metrics, whose package initialisation costs more than the
// few reads a build makes.)
func liveHeap() uint64 {
	var m runtime.MemStats
	runtime.ReadMemStats(&m)
	return m.HeapAlloc
}
