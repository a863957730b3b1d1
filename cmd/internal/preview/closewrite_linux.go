//go:build linux

package preview

import (
	"bytes"
	"encoding/binary"
	"os"
	"path/filepath"
	"sync"

	"golang.org/x/sys/unix"
)

// closeWatch reports the files in the watched folders whose save is
// complete: a file a writer has closed (inotify's IN_CLOSE_WRITE, which
// fsnotify does not pass on), and a file renamed into place
// (IN_MOVED_TO: an editor that saves atomically writes a temporary file
// and renames it over the document, which is then whole). The rebuild
// starts then instead of after the quiet period. It has an inotify
// instance of its own, watching the same folders.
type closeWatch struct {
	fd   int      // the inotify descriptor, for adding and removing watches
	f    *os.File // the same, read through the runtime's poller
	mu   sync.Mutex
	dirs map[int32]string // watch descriptor → folder
	wds  map[string]int32
	mods map[string]uint64 // file → writes seen (IN_MODIFY)
	ch   chan closeEvent
}

// closeEvent is a file closed after writing or renamed into place, and
// the number of writes to it seen then: a later write makes the event
// stale (closeWatch.current).
type closeEvent struct {
	name string
	mods uint64
}

// newCloseWatch starts an inotify instance; nil when the system gives
// none (the quiet period then does the work alone).
func newCloseWatch() *closeWatch {
	fd, err := unix.InotifyInit1(unix.IN_CLOEXEC | unix.IN_NONBLOCK)
	if err != nil {
		return nil
	}
	c := &closeWatch{fd: fd, f: os.NewFile(uintptr(fd), "inotify"), dirs: map[int32]string{}, wds: map[string]int32{}, mods: map[string]uint64{}, ch: make(chan closeEvent, 64)}
	go c.read()
	return c
}

// closed is the channel of the files closed after writing (nil for a nil
// closeWatch: it never sends).
func (c *closeWatch) closed() <-chan closeEvent {
	if c == nil {
		return nil
	}
	return c.ch
}

// add watches a folder; a folder that cannot be watched here is left to
// the quiet period.
func (c *closeWatch) add(dir string) {
	if c == nil {
		return
	}
	wd, err := unix.InotifyAddWatch(c.fd, dir, unix.IN_CLOSE_WRITE|unix.IN_MOVED_TO|unix.IN_MODIFY|unix.IN_ONLYDIR)
	if err != nil {
		return
	}
	c.mu.Lock()
	c.dirs[int32(wd)], c.wds[dir] = dir, int32(wd)
	c.mu.Unlock()
}

// remove stops watching a folder.
func (c *closeWatch) remove(dir string) {
	if c == nil {
		return
	}
	c.mu.Lock()
	wd, ok := c.wds[dir]
	delete(c.wds, dir)
	delete(c.dirs, wd)
	c.mu.Unlock()
	if ok {
		_, _ = unix.InotifyRmWatch(c.fd, uint32(wd))
	}
}

// current reports whether no write to the file of ev was seen since it
// was closed: the file is as its writer left it (as far as this instance
// has read its events).
func (c *closeWatch) current(ev closeEvent) bool {
	c.mu.Lock()
	defer c.mu.Unlock()
	return c.mods[ev.name] == ev.mods
}

// close ends the instance and its reader.
func (c *closeWatch) close() {
	if c != nil {
		c.f.Close()
	}
}

// read passes on each file closed after writing or renamed into place
// until the instance is closed. A file is dropped when the loop is busy: the quiet period
// follows that save.
func (c *closeWatch) read() {
	buf := make([]byte, 64*(unix.SizeofInotifyEvent+unix.NAME_MAX+1))
	for {
		n, err := c.f.Read(buf)
		if err != nil {
			return
		}
		for off := 0; off+unix.SizeofInotifyEvent <= n; {
			wd := int32(binary.NativeEndian.Uint32(buf[off:]))
			mask := binary.NativeEndian.Uint32(buf[off+4:])
			size := int(binary.NativeEndian.Uint32(buf[off+12:]))
			start := off + unix.SizeofInotifyEvent
			off = start + size
			if off > n {
				break
			}
			name := string(bytes.TrimRight(buf[start:off], "\x00"))
			c.mu.Lock()
			dir, ok := c.dirs[wd]
			if mask&unix.IN_IGNORED != 0 { // the folder went away
				delete(c.dirs, wd)
				if c.wds[dir] == wd {
					delete(c.wds, dir)
				}
			}
			file := filepath.Join(dir, name)
			if ok && name != "" && mask&unix.IN_MODIFY != 0 {
				c.mods[file]++
			}
			ev := closeEvent{name: file, mods: c.mods[file]}
			c.mu.Unlock()
			if !ok || name == "" || mask&(unix.IN_CLOSE_WRITE|unix.IN_MOVED_TO) == 0 {
				continue
			}
			select {
			case c.ch <- ev:
			default:
			}
		}
	}
}
