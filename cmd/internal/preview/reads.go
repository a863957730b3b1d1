package preview

import (
	"os"
	"path/filepath"

	"calcdoc/calcdoc"
)

// noteReads records the data files the document in file read, and
// watches their folders, so that saving one evaluates the document again;
// a file it could not read is looked for where its path leads, so that
// the document is evaluated again when it appears.
func (w *Watcher) noteReads(file string, doc *calcdoc.Document) {
	for _, docs := range w.reads {
		delete(docs, file)
	}
	for _, f := range doc.Files {
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
	for doc := range w.reads[name] {
		w.pending[doc] = true
		w.stale[doc] = true
	}
	return len(w.reads[name]) > 0
}
