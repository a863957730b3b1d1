// Package build is what the command and the live preview share: the
// inputs a PATH stands for, where each sheet goes, the stamp and options of
// a built sheet, and the build step itself (render, refuse to write over
// the source, write atomically).
package build

import (
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"sort"
	"strings"

	"calcdoc/calcdoc"
)

// SkipDir reports whether a folder is never looked into when a PATH is a
// folder.
func SkipDir(name string) bool { return name == ".git" || name == "node_modules" }

// Holds reports whether a file found below a folder PATH is a document to
// build: it holds a block of one of reg's kinds, wherever the block stands
// in the Markdown (Registry.HasBlock).
func Holds(reg *calcdoc.Registry, src []byte) bool { return reg.HasBlock(src) }

// IsMarkdown reports whether a file name is a document's: it ends in .md,
// in any case (a Windows editor may save NAME.MD).
func IsMarkdown(name string) bool { return strings.EqualFold(filepath.Ext(name), ".md") }

// Input is one document to process and the path of the output relative to
// the PATH it was found under.
type Input struct {
	Path string // the file
	Rel  string // relative to the PATH given (its base name for a file)
	// Root is the folder given on the command line (a file's own folder):
	// outside git, the files a document reads stay inside it.
	Root string
}

// Collect expands the PATHs of the command line: a file is taken as it is
// (it must end in .md), a folder means every .md file below it that holds
// a block of one of reg's kinds (Registry.HasBlock), in lexical order. A
// missing path, a file that is not .md, or a folder without documents is
// an error.
func Collect(paths []string, reg *calcdoc.Registry) ([]Input, error) {
	var out []Input
	for _, p := range paths {
		info, err := os.Stat(p)
		if err != nil {
			return nil, fmt.Errorf("%s: no such file or folder", p)
		}
		if !info.IsDir() {
			if !IsMarkdown(p) {
				return nil, fmt.Errorf("%s: not a Markdown document (the name must end in .md)", p)
			}
			out = append(out, Input{Path: p, Rel: filepath.Base(p), Root: filepath.Dir(p)})
			continue
		}
		var found []Input
		err = filepath.WalkDir(p, func(path string, d fs.DirEntry, err error) error {
			if err != nil {
				return nil // unreadable entries are skipped
			}
			if d.IsDir() {
				if path != p && SkipDir(d.Name()) {
					return filepath.SkipDir
				}
				return nil
			}
			if !IsMarkdown(path) || !d.Type().IsRegular() {
				return nil
			}
			src, rerr := os.ReadFile(path)
			if rerr != nil || !Holds(reg, src) {
				return nil
			}
			rel, _ := filepath.Rel(p, path)
			found = append(found, Input{Path: path, Rel: rel, Root: p})
			return nil
		})
		if err != nil {
			return nil, err
		}
		if len(found) == 0 {
			return nil, fmt.Errorf("%s: no document with a %s block in this folder", p, orList(reg.Words()))
		}
		sort.Slice(found, func(i, j int) bool { return found[i].Path < found[j].Path })
		out = append(out, found...)
	}
	return out, nil
}

// WriteFileAtomic writes data to a temporary file in the target's folder,
// flushes it to the disk and renames it into place, so that a reader sees
// the old file or the new one, never a part. On any error (a full disk
// makes Write, Sync or Close fail with ENOSPC) the temporary file is
// removed and the old file is left as it was. Temporary files that
// earlier, interrupted writes of path left are removed first
// (RemoveStale).
func WriteFileAtomic(path string, data []byte) error {
	return WriteFileAtomicWith(path, data, createTemp)
}

// TempFile is the temporary file of an atomic write.
type TempFile interface {
	io.Writer
	Name() string
	Sync() error
	Close() error
}

// WriteFileAtomicWith is WriteFileAtomic with the temporary file made by
// create (os.CreateTemp; tests pass one whose disk fills up).
func WriteFileAtomicWith(path string, data []byte, create func(dir, pattern string) (TempFile, error)) error {
	return writeAtomic(path, create, func(tmp TempFile) error {
		_, err := tmp.Write(data)
		return err
	})
}

// writeAtomic is WriteFileAtomicWith with the file's bytes written by
// fill; an error of fill fails the write as a failed Write does.
func writeAtomic(path string, create func(dir, pattern string) (TempFile, error), fill func(TempFile) error) error {
	RemoveStale(path)
	tmp, err := create(filepath.Dir(path), tempPattern(path))
	if err != nil {
		return err
	}
	name := tmp.Name()
	fail := func(e error) error {
		tmp.Close()
		os.Remove(name)
		return e
	}
	if err := fillOrRemove(tmp, fill); err != nil {
		return fail(err)
	}
	if err := tmp.Sync(); err != nil {
		return fail(err)
	}
	if err := tmp.Close(); err != nil {
		os.Remove(name)
		return err
	}
	mode := os.FileMode(0o644)
	if st, err := os.Stat(path); err == nil {
		mode = st.Mode().Perm()
	}
	if err := os.Chmod(name, mode); err != nil {
		os.Remove(name)
		return err
	}
	if err := os.Rename(name, path); err != nil {
		os.Remove(name)
		return err
	}
	return nil
}

// SameFile reports whether writing out would overwrite the source.
func SameFile(a, b string) bool {
	ia, err1 := os.Stat(a)
	ib, err2 := os.Stat(b)
	if err1 == nil && err2 == nil {
		return os.SameFile(ia, ib)
	}
	aa, _ := filepath.Abs(a)
	bb, _ := filepath.Abs(b)
	return aa == bb
}

// OutIsFile reports whether an -o value names one .html file rather than a
// folder.
func OutIsFile(out string) bool { return strings.HasSuffix(strings.ToLower(out), ".html") }

// Target is where the sheet of the document file goes, rel being its path
// relative to the PATH it was found under: beside the source without -o
// (out ""), out itself when it names one .html file, else the same
// relative path under the folder out.
func Target(out, file, rel string) string {
	switch {
	case out == "":
		return TrimExt(file) + ".html"
	case OutIsFile(out):
		return out
	}
	return filepath.Join(out, TrimExt(rel)+".html")
}

// orList joins words as "a, b or c".
func orList(words []string) string {
	if len(words) < 2 {
		return strings.Join(words, "")
	}
	return strings.Join(words[:len(words)-1], ", ") + " or " + words[len(words)-1]
}

// TrimExt drops a document's .md ending, in whatever case it is written.
func TrimExt(p string) string {
	if IsMarkdown(p) {
		return p[:len(p)-len(".md")]
	}
	return p
}

// fillOrRemove runs fill; should it panic (a sheet drawn into the file as
// it goes, whose drawing fails so), the temporary file is closed and
// removed before the panic goes on, as an error would remove it.
func fillOrRemove(tmp TempFile, fill func(TempFile) error) error {
	defer func() {
		if p := recover(); p != nil {
			tmp.Close()
			os.Remove(tmp.Name())
			panic(p)
		}
	}()
	return fill(tmp)
}
