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

// TestCloseWatchRename checks that a file renamed into a watched folder
// (over a document, as an atomic save does, or moved in from a folder not
// watched) is reported as complete at once: inotify(7) gives the folder
// IN_MOVED_TO with the new name for a rename to it, and nothing of the
// target name is closed after writing.
func TestCloseWatchRename(t *testing.T) {
	c := newCloseWatch()
	if c == nil {
		t.Skip("no inotify instance")
	}
	defer c.close()
	dir, away := t.TempDir(), t.TempDir()
	c.add(dir)
	p := filepath.Join(dir, "a.md")
	if err := os.WriteFile(p, []byte("```calc\nx = 1\n```\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	next := func(what string) closeEvent {
		t.Helper()
		select {
		case ev := <-c.closed():
			return ev
		case <-time.After(deadline):
			t.Fatalf("%s: nothing reported", what)
		}
		return closeEvent{}
	}
	if ev := next("written in place"); ev.name != p {
		t.Fatalf("written in place: reported %q, want %q", ev.name, p)
	}
	// an atomic save: a temporary file beside it, renamed over it
	tmp := filepath.Join(dir, ".a.md.tmp")
	if err := os.WriteFile(tmp, []byte("```calc\nx = 2\n```\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	if ev := next("the temporary file"); ev.name != tmp {
		t.Fatalf("the temporary file closed: reported %q, want %q", ev.name, tmp)
	}
	if err := os.Rename(tmp, p); err != nil {
		t.Fatal(err)
	}
	if ev := next("renamed over"); ev.name != p || !c.current(ev) {
		t.Fatalf("renamed over the document: reported %q (current %v), want %q, current", ev.name, c.current(ev), p)
	}
	// moved in from a folder that is not watched
	src := filepath.Join(away, "b.md")
	if err := os.WriteFile(src, []byte("```calc\ny = 1\n```\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.Rename(src, filepath.Join(dir, "b.md")); err != nil {
		t.Fatal(err)
	}
	if ev := next("moved in"); ev.name != filepath.Join(dir, "b.md") {
		t.Fatalf("moved in: reported %q, want %q", ev.name, filepath.Join(dir, "b.md"))
	}
	// moved away: no report (IN_MOVED_FROM is not asked for)
	if err := os.Rename(filepath.Join(dir, "b.md"), filepath.Join(away, "c.md")); err != nil {
		t.Fatal(err)
	}
	select {
	case ev := <-c.closed():
		t.Fatalf("%s reported after it was moved away", ev.name)
	case <-time.After(50 * time.Millisecond):
	}
}
