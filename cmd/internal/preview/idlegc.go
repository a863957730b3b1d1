package preview

import (
	"runtime"
	"time"
)

// The watch process lives long and keeps each document's evaluation,
// drawings and pages: a 10,000-statement document holds some 50 MB live,
// and each save allocates some 13 MB (reading the text again, the blocks
// evaluated again, the new page). Left to the proportional target, a
// collection starts during every few saves, when the allocation of a
// rebuild crosses it, and marks those 50 MB while the save waits for the
// processor (on a 2-core machine, a collection during a save took its
// time from about 20 ms to 100 ms and more). Between saves the process is
// idle. So, when Config.CollectWhenIdle is set, the watcher collects once
// every evaluation is done and nothing has been asked of it for IdleGC,
// when at least idleGCBytes have been allocated since: the next save then
// starts with its heap at the live size, and the proportional target
// (which the command keeps: docs/performance.md, "Garbage collector
// setting") is reached only in a burst of saves with no pause between
// them, where it still bounds the memory.

// IdleGC is how long the watcher waits, once every evaluation is done,
// before it collects.
const IdleGC = 50 * time.Millisecond

// idleGCBytes is the least allocation since the last idle collection that
// makes another worth its time.
var idleGCBytes uint64 = 4 << 20

// idleLocked arms the idle collection once no evaluation runs; w.mu is
// held.
func (w *Watcher) idleLocked() {
	if !w.cfg.CollectWhenIdle || len(w.evals) > 0 {
		return
	}
	if w.gcTimer == nil {
		w.gcTimer = time.AfterFunc(IdleGC, w.collectIdle)
		return
	}
	w.gcTimer.Reset(IdleGC)
}

// busyLocked disarms it: an evaluation starts; w.mu is held.
func (w *Watcher) busyLocked() {
	if w.gcTimer != nil {
		w.gcTimer.Stop()
	}
}

// collectIdle collects when still idle and enough was allocated since the
// last time.
func (w *Watcher) collectIdle() {
	w.mu.Lock()
	idle := len(w.evals) == 0
	w.mu.Unlock()
	if !idle {
		return
	}
	// the bytes allocated so far (runtime.MemStats rather than
	// runtime/metrics, whose package initialisation every command pays)
	var m runtime.MemStats
	runtime.ReadMemStats(&m)
	now := m.TotalAlloc
	if now-w.gcAllocs.Load() < idleGCBytes {
		return
	}
	w.gcAllocs.Store(now)
	runtime.GC()
	w.idleGCs.Add(1)
}
