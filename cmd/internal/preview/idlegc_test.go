package preview

import (
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"testing"
	"time"
)

// TestIdleCollection: with CollectWhenIdle, the watcher collects once
// every evaluation of a save is done and it has been idle for IdleGC
// (counted by runtime.NumGC too); without it, it never does.
func TestIdleCollection(t *testing.T) {
	was := idleGCBytes
	idleGCBytes = 0 // every idle moment is worth a collection here
	t.Cleanup(func() { idleGCBytes = was })
	for _, on := range []bool{true, false} {
		dir := t.TempDir()
		p := filepath.Join(dir, "a.md")
		if err := os.WriteFile(p, []byte(docSrc(1)), 0o644); err != nil {
			t.Fatal(err)
		}
		h := start(t, Config{Paths: []string{dir}, CollectWhenIdle: on})
		before := h.w.idleGCs.Load()
		var ms runtime.MemStats
		runtime.ReadMemStats(&ms)
		gcs := ms.NumGC
		if err := os.WriteFile(p, []byte(docSrc(2)), 0o644); err != nil {
			t.Fatal(err)
		}
		h.wait("/a.html", func(st int, body string) string {
			if st != 200 || !strings.Contains(body, "save-2") {
				return "the save is not shown yet"
			}
			return ""
		})
		end := time.Now().Add(deadline)
		if !on {
			end = time.Now().Add(4 * IdleGC)
		}
		for h.w.idleGCs.Load() == before && time.Now().Before(end) {
			time.Sleep(IdleGC / 5)
		}
		got := h.w.idleGCs.Load() - before
		switch {
		case on && got == 0:
			t.Errorf("no collection once the save was evaluated")
		case !on && got != 0:
			t.Errorf("%d collections without CollectWhenIdle", got)
		}
		if on {
			runtime.ReadMemStats(&ms)
			if ms.NumGC == gcs {
				t.Errorf("the runtime counts no collection since the save")
			}
		}
	}
}
