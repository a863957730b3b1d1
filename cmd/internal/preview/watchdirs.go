package preview

import (
	"io/fs"
	"os"
	"path/filepath"
)

// The folders watched: each folder under a folder PATH, the folder of a
// file PATH, and the folders of the data files documents read.

func (w *Watcher) addWatch(dir string) {
	if w.watched[dir] {
		return
	}
	if err := w.fsw.Add(dir); err != nil {
		if msg := err.Error(); w.cannot[dir] != msg { // said once, not at every Retry
			w.cannot[dir] = msg
			w.logf("cannot watch %s: %v; changes in it will not be seen", dir, err)
		}
		return
	}
	delete(w.cannot, dir)
	w.watched[dir] = true
	w.cw.add(dir)
}

// addTree watches dir and every folder below it (not following symbolic
// links, skipping .git and node_modules) and queues every .md file found.
func (w *Watcher) addTree(dir string) {
	_ = filepath.WalkDir(dir, func(p string, d fs.DirEntry, err error) error {
		if err != nil {
			return nil // an unreadable entry is skipped
		}
		if d.IsDir() {
			if p != dir && skipDir(d.Name()) {
				return filepath.SkipDir
			}
			w.addWatch(p)
			return nil
		}
		if filepath.Ext(p) == ".md" {
			w.pending[p] = true
		}
		return nil
	})
}

// recover watches again the folder of each PATH that went away and is
// back (a folder again, not a symbolic link), and queues its documents. It
// reports whether it queued anything.
func (w *Watcher) recover() bool {
	queued := false
	for _, r := range w.roots {
		if !r.lost || w.watched[r.dir] {
			continue
		}
		fi, err := os.Lstat(r.dir)
		if err != nil || !fi.IsDir() {
			continue
		}
		if real, err := filepath.EvalSymlinks(r.dir); err != nil || real != r.dir {
			continue
		}
		if r.file != "" {
			w.addWatch(r.dir)
			w.pending[filepath.Join(r.dir, r.file)] = true
		} else {
			w.addTree(r.dir)
		}
		if !w.watched[r.dir] {
			continue // cannot be watched (said by addWatch): tried again at the next Retry
		}
		r.lost = false
		w.logf("%s: its folder is back; watching it again", r.given)
		queued = true
	}
	// other PATHs in the same folder come back with it
	for _, r := range w.roots {
		if r.lost && w.watched[r.dir] {
			r.lost = false
			if r.file != "" {
				w.pending[filepath.Join(r.dir, r.file)] = true
			}
			queued = true
		}
	}
	return queued
}

// watchRoots watches every PATH (a file's folder, a folder's tree) and
// queues its documents.
func (w *Watcher) watchRoots() {
	for _, r := range w.roots {
		if r.file != "" {
			w.addWatch(r.dir)
			w.pending[filepath.Join(r.dir, r.file)] = true
		} else {
			w.addTree(r.dir)
		}
	}
}

// rescan queues every file under every PATH, and every document known.
func (w *Watcher) rescan() {
	w.watchRoots()
	for _, fs := range w.shadow {
		for f := range fs {
			w.pending[f] = true
		}
	}
	w.mu.RLock()
	for _, p := range w.docs {
		w.pending[p.file] = true
	}
	w.mu.RUnlock()
}

// closeWritten notes that an editor closed the file name after writing
// it: a document or a data file read again at once. It reports whether
// it asks anything.
func (w *Watcher) closeWritten(name string) bool {
	name = filepath.Clean(name)
	queued := false
	if filepath.Ext(name) == ".md" {
		if _, _, ok := w.claim(name); ok {
			w.pending[name] = true
			queued = true
		}
	}
	return w.dataSaved(name) || queued
}
