//go:build linux

package preview

import (
	"os"
	"path/filepath"
	"testing"
	"time"
)

// TestCloseWatch checks that a file written and closed in a watched folder
// is reported once closed (inotify IN_CLOSE_WRITE, inotify(7)), and that
// a write after it makes that report stale.
func TestCloseWatch(t *testing.T) {
	c := newCloseWatch()
	if c == nil {
		t.Skip("no inotify instance")
	}
	defer c.close()
	dir := t.TempDir()
	c.add(dir)
	p := filepath.Join(dir, "a.md")
	f, err := os.Create(p)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := f.WriteString("```calc\nx = 1\n```\n"); err != nil {
		t.Fatal(err)
	}
	select {
	case ev := <-c.closed():
		t.Fatalf("%s reported before it was closed", ev.name)
	case <-time.After(50 * time.Millisecond):
	}
	f.Close()
	var ev closeEvent
	select {
	case ev = <-c.closed():
	case <-time.After(deadline):
		t.Fatal("the file closed after writing was not reported")
	}
	if ev.name != p || !c.current(ev) {
		t.Fatalf("reported %q (current %v), want %q, current", ev.name, c.current(ev), p)
	}
	// written again, not yet closed: the report is stale
	f, err = os.OpenFile(p, os.O_WRONLY|os.O_APPEND, 0)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	if _, err := f.WriteString("y = 2\n"); err != nil {
		t.Fatal(err)
	}
	for end := time.Now().Add(deadline); c.current(ev); time.Sleep(5 * time.Millisecond) {
		if time.Now().After(end) {
			t.Fatal("a write after the close did not make the report stale")
		}
	}
	// a folder no longer watched reports nothing
	c.remove(dir)
	f.Close()
	select {
	case ev := <-c.closed():
		t.Fatalf("%s reported after its folder was removed", ev.name)
	case <-time.After(50 * time.Millisecond):
	}
}
