//go:build unix

package preview

import (
	"fmt"
	"io/fs"
	"net/http"
	"os"
	"path/filepath"
	"strings"
	"sync/atomic"
	"syscall"
	"testing"
	"time"
)

// The fault drills of watch mode: a document that cannot be read, a
// watched folder deleted and made again, and a disk that is full when a
// sheet is written out. In each the server goes on: it keeps answering,
// and a later save of a document is shown. They work as root too, where
// a file's mode does not stop reading it.

// cannotRead checks for the page that stands in for a document that
// cannot be read, with the reason given.
func cannotRead(why string) func(int, string) string {
	return func(st int, body string) string {
		if st != http.StatusInternalServerError {
			return fmt.Sprintf("status %d, want 500", st)
		}
		if !strings.Contains(body, "Cannot read") || !strings.Contains(body, why) {
			return fmt.Sprintf("the page does not say that the file cannot be read because %q", why)
		}
		if saveNote.MatchString(body) {
			return "the page shows the values of an earlier save"
		}
		return ""
	}
}

// mkfifo makes a named pipe, or skips the test where none can be made.
func mkfifo(t *testing.T, path string) {
	t.Helper()
	if err := syscall.Mkfifo(path, 0o644); err != nil {
		t.Skipf("cannot make a named pipe here: %v", err)
	}
}

// TestUnreadableDocument: a document that becomes unreadable is served as
// a page saying why, never as its last sheet and never by blocking the
// watcher; the other documents go on being evaluated, and the document is
// shown again once it can be read.
func TestUnreadableDocument(t *testing.T) {
	cases := []struct {
		name string
		file bool // the PATH is the file, not its folder
		// spoil makes dir/a.md unreadable; the page must then give why.
		spoil func(t *testing.T, dir string)
		why   string
	}{
		{"larger than the size limit", false, func(t *testing.T, dir string) {
			saveRenameOver(t, filepath.Join(dir, "a.md"), docSrc(2)+strings.Repeat("padding line\n", 400))
		}, "the file is larger than the 4096 bytes a document may have"},
		{"a named pipe renamed over it", false, func(t *testing.T, dir string) {
			// Nothing ever writes to the pipe: opening it for reading
			// would block for good.
			tmp := filepath.Join(dir, ".a.md.pipe")
			mkfifo(t, tmp)
			if err := os.Rename(tmp, filepath.Join(dir, "a.md")); err != nil {
				t.Fatal(err)
			}
		}, "it is a named pipe, not a regular file"},
		{"a file PATH replaced by a folder", true, func(t *testing.T, dir string) {
			p := filepath.Join(dir, "a.md")
			if err := os.Remove(p); err != nil {
				t.Fatal(err)
			}
			if err := os.Mkdir(p, 0o755); err != nil {
				t.Fatal(err)
			}
		}, "it is a folder, not a regular file"},
		{"a file PATH replaced by a named pipe", true, func(t *testing.T, dir string) {
			p := filepath.Join(dir, "a.md")
			if err := os.Remove(p); err != nil {
				t.Fatal(err)
			}
			mkfifo(t, p)
		}, "it is a named pipe, not a regular file"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			old := maxSize
			maxSize = 4096
			t.Cleanup(func() { maxSize = old })
			dir := t.TempDir()
			a := filepath.Join(dir, "a.md")
			write(t, a, docSrc(1))
			cfg := Config{Paths: []string{dir}}
			if c.file {
				cfg.Paths = []string{a}
			}
			h := start(t, cfg)
			h.wait("/a.html", showsSave(1))

			c.spoil(t, dir)
			h.wait("/a.html", cannotRead(c.why))
			h.wait("/", listed("/a.html", "cannot be read: "+c.why))
			if !strings.Contains(h.log.String(), "cannot be read: "+c.why) {
				t.Errorf("the log does not say that a.md cannot be read because %q", c.why)
			}

			// The watcher goes on: another document is evaluated.
			if !c.file {
				write(t, filepath.Join(dir, "b.md"), docSrc(7))
				h.wait("/b.html", showsSave(7))
			}
			// ... and the document is shown again once it is a file.
			if err := os.RemoveAll(a); err != nil {
				t.Fatal(err)
			}
			write(t, a, docSrc(3))
			h.wait("/a.html", showsSave(3))
			h.wait("/", listed("/a.html", "checks hold"))
		})
	}
}

// TestFolderComesBack: a watched folder that is deleted or moved away
// takes its documents off the preview; once a folder of that name is made
// again (by a checkout, an unpacked archive, a sync tool), it is watched
// again: its documents come back, and later saves in it are seen.
func TestFolderComesBack(t *testing.T) {
	cases := []struct {
		name string
		file bool // the PATH is docs/a.md, not the folder docs
		// away takes the folder docs away.
		away func(t *testing.T, docs string)
	}{
		{"a folder PATH deleted", false, func(t *testing.T, docs string) {
			if err := os.RemoveAll(docs); err != nil {
				t.Fatal(err)
			}
		}},
		{"a folder PATH moved away", false, func(t *testing.T, docs string) {
			if err := os.Rename(docs, docs+".old"); err != nil {
				t.Fatal(err)
			}
		}},
		{"the folder of a file PATH deleted", true, func(t *testing.T, docs string) {
			if err := os.RemoveAll(docs); err != nil {
				t.Fatal(err)
			}
		}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			docs := filepath.Join(t.TempDir(), "docs")
			a := filepath.Join(docs, "a.md")
			b := filepath.Join(docs, "sub", "b.md")
			write(t, a, docSrc(1))
			write(t, b, docSrc(2))
			cfg := Config{Paths: []string{docs}}
			if c.file {
				cfg.Paths = []string{a}
			}
			h := start(t, cfg)
			h.wait("/a.html", showsSave(1))

			c.away(t, docs)
			h.wait("/a.html", isGone)
			h.wait("/", unlisted("/a.html"))
			h.wait("/", unlisted("/sub/b.html"))

			// Made again, with its documents written at once (they may
			// be there before the folder is watched).
			write(t, a, docSrc(3))
			write(t, b, docSrc(4))
			h.wait("/a.html", showsSave(3))
			if !c.file {
				h.wait("/sub/b.html", showsSave(4))
			}
			// Watched again, not read once: a save is seen.
			saveRenameOver(t, a, docSrc(5))
			h.wait("/a.html", showsSave(5))
			if !c.file {
				saveInPlace(t, b, docSrc(6))
				h.wait("/sub/b.html", showsSave(6))
			}
			if c.name == "a folder PATH moved away" {
				// The folder moved away is no longer watched.
				saveInPlace(t, filepath.Join(docs+".old", "a.md"), docSrc(9))
				saveInPlace(t, a, docSrc(8))
				h.wait("/a.html", showsSave(8))
			}
			log := h.log.String()
			for _, want := range []string{"its folder is gone; watching for it to come back", "its folder is back; watching it again"} {
				if !strings.Contains(log, want) {
					t.Errorf("the log does not say %q", want)
				}
			}
		})
	}
}

// TestFolderComesBackAsLink: a watched folder made again as a symbolic
// link to a folder elsewhere is not followed (nothing outside the watched
// folders is read); a real folder made in its place is watched.
func TestFolderComesBackAsLink(t *testing.T) {
	base := t.TempDir()
	docs := filepath.Join(base, "docs")
	outside := filepath.Join(base, "outside")
	write(t, filepath.Join(docs, "a.md"), docSrc(1))
	write(t, filepath.Join(outside, "a.md"), strings.Replace(docSrc(2), "save-2", "OUTSIDE", 1))
	h := start(t, Config{Paths: []string{docs}})
	h.wait("/a.html", showsSave(1))
	if err := os.RemoveAll(docs); err != nil {
		t.Fatal(err)
	}
	h.wait("/a.html", isGone)
	if err := os.Symlink(outside, docs); err != nil {
		t.Skipf("cannot make symbolic links here: %v", err)
	}
	// Several Retry periods and rebuild windows: the link is never taken.
	time.Sleep(4*Retry + 2*MaxDelay)
	if st, body := h.get("/a.html"); st != http.StatusNotFound || strings.Contains(body, "OUTSIDE") {
		t.Fatalf("GET /a.html through a link to a folder outside: status %d, want 404 and no sheet", st)
	}
	if err := os.Remove(docs); err != nil {
		t.Fatal(err)
	}
	write(t, filepath.Join(docs, "a.md"), docSrc(3))
	h.wait("/a.html", showsSave(3))
}

// fullDisk is a temporary file on a disk that fills up: when full is set,
// the call named by at fails with ENOSPC, after a write has put half of
// the data on the disk, as a full disk does.
type fullDisk struct {
	f    *os.File
	at   string // "write", "sync" or "close"
	full *atomic.Bool
	hits *atomic.Int32
}

func (d *fullDisk) Name() string { return d.f.Name() }

func (d *fullDisk) fail(op string) error {
	d.hits.Add(1)
	return &fs.PathError{Op: op, Path: d.f.Name(), Err: syscall.ENOSPC}
}

func (d *fullDisk) Write(p []byte) (int, error) {
	if !d.full.Load() {
		return d.f.Write(p)
	}
	n, err := d.f.Write(p[:len(p)/2])
	if err != nil {
		return n, err
	}
	if d.at == "write" {
		return n, d.fail("write")
	}
	m, err := d.f.Write(p[n:])
	return n + m, err
}

func (d *fullDisk) Sync() error {
	if d.full.Load() && d.at == "sync" {
		return d.fail("sync")
	}
	return d.f.Sync()
}

func (d *fullDisk) Close() error {
	err := d.f.Close()
	if d.full.Load() && d.at == "close" {
		return d.fail("close")
	}
	return err
}

// TestDiskFull: when the disk is full as a sheet is written out (-o), the
// last sheet written is left as it was, no temporary file is left behind,
// the log says so, the preview goes on showing the latest save, and the
// next save once there is room is written.
func TestDiskFull(t *testing.T) {
	for _, at := range []string{"write", "sync", "close"} {
		t.Run("fails at "+at, func(t *testing.T) {
			var full atomic.Bool
			var hits atomic.Int32
			old := createTemp
			createTemp = func(dir, pattern string) (tempFile, error) {
				f, err := os.CreateTemp(dir, pattern)
				if err != nil {
					return nil, err
				}
				return &fullDisk{f: f, at: at, full: &full, hits: &hits}, nil
			}
			// registered before start, so run after the server has stopped
			t.Cleanup(func() { createTemp = old })

			dir, out := t.TempDir(), t.TempDir()
			src := filepath.Join(dir, "a.md")
			target := filepath.Join(out, "a.html")
			write(t, src, docSrc(1))
			h := start(t, Config{Paths: []string{dir}, Out: out})
			good := waitFile(t, target, "save-1")

			full.Store(true)
			saveRenameOver(t, src, docSrc(2))
			h.wait("/a.html", showsSave(2)) // the preview goes on
			want := "cannot write " + target + " (any earlier one is left as it was): " + at + " "
			waitLog(t, h, want)
			if !strings.Contains(h.log.String(), syscall.ENOSPC.Error()) {
				t.Errorf("the log does not name the error %q", syscall.ENOSPC.Error())
			}
			if hits.Load() == 0 {
				t.Fatalf("the full disk was never written to")
			}
			if b, err := os.ReadFile(target); err != nil || string(b) != good {
				t.Errorf("%s changed while the disk was full (err %v)", target, err)
			}
			onlyFile(t, out, target)

			full.Store(false)
			saveInPlace(t, src, docSrc(3))
			h.wait("/a.html", showsSave(3))
			waitFile(t, target, "save-3")
			onlyFile(t, out, target)
		})
	}
}

// waitFile waits until path holds a sheet with the note, and returns it.
func waitFile(t *testing.T, path, note string) string {
	t.Helper()
	end := time.Now().Add(deadline)
	for {
		b, err := os.ReadFile(path)
		if err == nil && strings.Contains(string(b), `<div class="desc">`+note+`</div>`) {
			return string(b)
		}
		if time.Now().After(end) {
			t.Fatalf("%s does not show %s after %v (err %v)", path, note, deadline, err)
		}
		time.Sleep(10 * time.Millisecond)
	}
}

// waitLog waits until the log has a line containing want.
func waitLog(t *testing.T, h *harness, want string) {
	t.Helper()
	end := time.Now().Add(deadline)
	for !strings.Contains(h.log.String(), want) {
		if time.Now().After(end) {
			t.Fatalf("the log has no line with %q after %v", want, deadline)
		}
		time.Sleep(10 * time.Millisecond)
	}
}

// onlyFile checks that the folder out holds the one file want.
func onlyFile(t *testing.T, out, want string) {
	t.Helper()
	var files []string
	filepath.WalkDir(out, func(p string, d fs.DirEntry, err error) error {
		if err == nil && !d.IsDir() {
			files = append(files, p)
		}
		return nil
	})
	if len(files) != 1 || files[0] != want {
		t.Errorf("files in the output folder = %v, want only %s (no temporary file left)", files, want)
	}
}
