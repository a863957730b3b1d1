package preview

import (
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"

	blockkind "calcdoc/calcdoc/kind"
	"calcdoc/cmd/internal/build"
)

// outcome of reading a file
type readKind int

const (
	readOK readKind = iota
	readAbsent
	readFailed
	readRaced     // replaced while being opened: read again at the next rebuild
	readIrregular // not a regular file (a folder, a named pipe, a symbolic link): never opened
)

// read reads a document's file. It never opens a file that is not a
// regular file, such as a symbolic link or a named pipe (readIrregular,
// with what it is), and refuses (as absent) a file whose folder is no
// longer the folder watched (a folder on the way replaced by a symbolic
// link), so that nothing outside the watched folders is ever read.
func (w *Watcher) read(r *root, file string) ([]byte, readKind, string) {
	dir := filepath.Dir(file)
	if real, err := filepath.EvalSymlinks(dir); err != nil || real != dir {
		return nil, readAbsent, "deleted"
	}
	fi, err := os.Lstat(file)
	if errors.Is(err, fs.ErrNotExist) {
		return nil, readAbsent, "deleted"
	}
	if err != nil {
		return nil, readFailed, err.Error()
	}
	if !fi.Mode().IsRegular() {
		return nil, readIrregular, "it is " + fileKind(fi.Mode()) + ", not a regular file"
	}
	f, err := openDoc(file)
	if errors.Is(err, fs.ErrNotExist) {
		return nil, readAbsent, "deleted"
	}
	if err != nil {
		return nil, readFailed, err.Error()
	}
	defer f.Close()
	if fi2, err := f.Stat(); err != nil || !os.SameFile(fi, fi2) {
		return nil, readRaced, ""
	}
	src, err := io.ReadAll(io.LimitReader(f, maxSize+1))
	if err != nil {
		return nil, readFailed, err.Error()
	}
	if int64(len(src)) > maxSize {
		return nil, readFailed, fmt.Sprintf("the file is larger than the %d bytes a document may have", maxSize)
	}
	if r.file == "" && !build.Holds(blockkind.Standard(), src) {
		return nil, readAbsent, "holds no evaluated block (calc, solve, phasors, sweep, ...)"
	}
	return src, readOK, ""
}

// fileKind names what a file that is not a regular file is.
func fileKind(m fs.FileMode) string {
	switch {
	case m&fs.ModeDir != 0:
		return "a folder"
	case m&fs.ModeSymlink != 0:
		return "a symbolic link (watch follows none)"
	case m&fs.ModeNamedPipe != 0:
		return "a named pipe"
	case m&fs.ModeSocket != 0:
		return "a socket"
	case m&fs.ModeDevice != 0:
		return "a device"
	}
	return "a special file"
}
