package calcdoc

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
)

// ResolveInside resolves the path rel that a document at docPath names
// (`table NAME from PATH`, `use ... from PATH`): relative to the
// document's folder, written with / or with Windows' \ as separator. The
// file it leads to, after every symbolic link is followed, must lie inside
// root: the git repository that holds the document, or, outside git, the
// folder given on the command line (FindRoot). The result is the file's
// path with the links followed, to be read. An absolute path, a path that
// leads out of root (by .. or by a link), and a path to no file are
// errors that say so.
func ResolveInside(docPath, rel, root string) (string, error) {
	if rel == "" {
		return "", errors.New("no path given: name the file relative to the document, e.g. data/cu.csv")
	}
	slashed := strings.ReplaceAll(rel, `\`, "/")
	if strings.HasPrefix(slashed, "/") || filepath.IsAbs(rel) || filepath.VolumeName(rel) != "" || hasDrive(slashed) {
		return "", fmt.Errorf("%s is an absolute path: name the file relative to the document, so that the repository can move", rel)
	}
	realRoot, err := filepath.EvalSymlinks(root)
	if err != nil {
		return "", fmt.Errorf("the folder %s that files must stay inside cannot be read: %v", root, err)
	}
	if realRoot, err = filepath.Abs(realRoot); err != nil {
		return "", err
	}
	joined := filepath.Join(filepath.Dir(docPath), filepath.FromSlash(slashed))
	real, err := filepath.EvalSymlinks(joined)
	if err != nil {
		if errors.Is(err, fs.ErrNotExist) {
			return "", fmt.Errorf("%s: no such file (the path is relative to the document's folder, %s)", rel, filepath.Dir(docPath))
		}
		return "", fmt.Errorf("%s: %v", rel, err)
	}
	if real, err = filepath.Abs(real); err != nil {
		return "", err
	}
	if !inside(real, realRoot) {
		return "", fmt.Errorf("%s leads out of %s, to %s: a document may read only files inside the repository that holds it (outside git, inside the folder given on the command line); copy the file in", rel, root, real)
	}
	st, err := os.Stat(real)
	if err != nil {
		return "", fmt.Errorf("%s: %v", rel, err)
	}
	if st.IsDir() {
		return "", fmt.Errorf("%s is a folder, not a file", rel)
	}
	return real, nil
}

// ResolveLexical is ResolveInside without the disk: rel joined to the
// document's folder and cleaned, made absolute, which must lie inside
// root (compared as written, no link followed). It serves files read
// from somewhere other than the disk (a git revision, Inputs.Read).
func ResolveLexical(docPath, rel, root string) (string, error) {
	if rel == "" {
		return "", errors.New("no path given: name the file relative to the document, e.g. data/cu.csv")
	}
	slashed := strings.ReplaceAll(rel, `\`, "/")
	if strings.HasPrefix(slashed, "/") || filepath.IsAbs(rel) || filepath.VolumeName(rel) != "" || hasDrive(slashed) {
		return "", fmt.Errorf("%s is an absolute path: name the file relative to the document, so that the repository can move", rel)
	}
	p, err := filepath.Abs(filepath.Join(filepath.Dir(docPath), filepath.FromSlash(slashed)))
	if err != nil {
		return "", err
	}
	r, err := filepath.Abs(root)
	if err != nil {
		return "", err
	}
	if !inside(p, r) {
		return "", fmt.Errorf("%s leads out of %s: a document may read only files inside the repository that holds it (outside git, inside the folder given on the command line); copy the file in", rel, root)
	}
	return p, nil
}

// hasDrive reports a Windows drive letter, "C:/...", in a path written
// with /, whatever the system.
func hasDrive(p string) bool {
	return len(p) >= 2 && p[1] == ':' && (p[0] >= 'A' && p[0] <= 'Z' || p[0] >= 'a' && p[0] <= 'z')
}

// inside reports whether path p lies in folder dir (both absolute, clean).
func inside(p, dir string) bool {
	r, err := filepath.Rel(dir, p)
	if err != nil {
		return false
	}
	return r != ".." && !strings.HasPrefix(r, ".."+string(filepath.Separator)) && !filepath.IsAbs(r)
}

// FindRoot is the folder that a document's files must stay inside: the
// top of the git repository holding docPath (the nearest folder above it
// with a .git folder or file, as a worktree has), or else fallback, the
// folder given on the command line.
func FindRoot(docPath, fallback string) string {
	dir, err := filepath.Abs(filepath.Dir(docPath))
	if err != nil {
		return fallback
	}
	for {
		if _, err := os.Lstat(filepath.Join(dir, ".git")); err == nil {
			return dir
		}
		up := filepath.Dir(dir)
		if up == dir {
			return fallback
		}
		dir = up
	}
}
