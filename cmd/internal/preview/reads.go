package preview

import (
	"os"
	"path/filepath"

	"calcdoc/calcdoc"
)

// readNote is what an evaluation read besides its document: the data
// files (a table's CSV) of the document in file.
type readNote struct {
	file  string
	files []*calcdoc.DataFile
	moved bool // its values moved: the sheets that use it are evaluated again
}

// queueReads hands the data files an evaluation read to the watcher's
// loop, which alone touches the maps of what is watched; evaluations run
// on workers of their own (eval.go).
func (w *Watcher) queueReads(file string, files []*calcdoc.DataFile, moved bool) {
	w.readMu.Lock()
	w.readQ = append(w.readQ, readNote{file: file, files: files, moved: moved})
	w.readMu.Unlock()
	select {
	case w.poke <- struct{}{}:
	default:
	}
}

// takeReads records, on the loop, the data files of the evaluations done
// since it last ran, and queues the sheets that use a document whose
// values moved; it reports whether it queued one.
func (w *Watcher) takeReads() bool {
	w.readMu.Lock()
	q := w.readQ
	w.readQ = nil
	w.readMu.Unlock()
	moved := map[string]bool{}
	for _, n := range q {
		w.noteReads(n.file, n.files)
		if n.moved {
			moved[calcdoc.RealPath(n.file)] = true
		}
	}
	return len(moved) > 0 && w.queueUsers(moved)
}

// noteReads records the data files the document in file read, and
// watches their folders, so that saving one evaluates the document again;
// a file it could not read is looked for where its path leads, so that
// the document is evaluated again when it appears.
func (w *Watcher) noteReads(file string, files []*calcdoc.DataFile) {
	for _, docs := range w.reads {
		delete(docs, file)
	}
	for _, f := range files {
		disk := f.Disk
		if disk == "" {
			disk = filepath.Join(filepath.Dir(file), filepath.FromSlash(f.Path))
		}
		abs, err := filepath.Abs(disk)
		if err != nil {
			continue
		}
		if w.reads[abs] == nil {
			w.reads[abs] = map[string]bool{}
		}
		w.reads[abs][file] = true
		if fi, err := os.Stat(filepath.Dir(abs)); err == nil && fi.IsDir() {
			w.addWatch(filepath.Dir(abs))
		}
	}
}

// dataSaved queues each document that read the data file name (a table's
// CSV file), to be evaluated again though its own bytes did not change;
// it reports whether there is one.
func (w *Watcher) dataSaved(name string) bool {
	w.takeReads()
	for doc := range w.reads[name] {
		w.pending[doc] = true
		w.stale[doc] = true
	}
	return len(w.reads[name]) > 0
}
