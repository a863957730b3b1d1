package stamp

import (
	"crypto/sha1"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"hash"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
)

// Finding the repository without git.
//
// Most sheets are built outside any repository, or inside one whose git
// facts take one run of git. Before it runs git at all, the stamp looks
// for the repository as git's own discovery does (setup.c): from the
// file's folder upwards, a folder holding a ".git" entry (a folder, or a
// file as in linked work trees and submodules), or a folder that is itself
// a git directory (HEAD, objects and refs: a bare repository, or the inside
// of a ".git" folder). No such folder up to the root or to a ceiling means
// no repository holds the file: git is not run, and the stamp says "not in
// a git repository" as git would have made it say.
//
// The walk may find more than git would (a ".git" git does not accept, a
// repository beyond a file-system boundary, which git does not cross
// unless GIT_DISCOVERY_ACROSS_FILESYSTEM is set): then git is run and its
// answer decides, as before. It must never find less: so it honours
// GIT_CEILING_DIRECTORIES as git does, and an entry it cannot examine
// (no permission) counts as found. GIT_DIR and GIT_WORK_TREE need no
// care: the stamp never passes them to git (droppedEnv), so git too looks
// from the file's folder.

// repoKind is what the walk found.
type repoKind int

const (
	noRepo     repoKind = iota // nothing up to the root or a ceiling
	dotGit                     // a ".git" folder or file in the folder
	gitDirLike                 // the folder looks like a git directory itself, or could not be examined
)

// findRepo walks up from dir (absolute, symbolic links resolved) and
// returns the first folder that may hold the repository and what it
// holds.
func findRepo(dir string) (string, repoKind) {
	ceil := ceilingLen(dir, os.Getenv("GIT_CEILING_DIRECTORIES"))
	d := dir
	for {
		_, err := os.Lstat(filepath.Join(d, ".git"))
		if err == nil {
			return d, dotGit
		}
		if !errors.Is(err, fs.ErrNotExist) {
			return d, gitDirLike // cannot tell: let git look
		}
		if looksLikeGitDir(d) {
			return d, gitDirLike
		}
		parent := filepath.Dir(d)
		// git stops before a folder that is a ceiling or above one (a
		// root folder counts without its separator)
		if parent == d || len(strings.TrimRight(parent, string(filepath.Separator))) <= ceil {
			return "", noRepo
		}
		d = parent
	}
}

// looksLikeGitDir reports whether d holds what git's is_git_directory
// needs: HEAD, objects and refs (or could not be examined).
func looksLikeGitDir(d string) bool {
	for _, name := range []string{"HEAD", "objects", "refs"} {
		if _, err := os.Lstat(filepath.Join(d, name)); errors.Is(err, fs.ErrNotExist) {
			return false
		}
	}
	return true
}

// ceilingLen is the length of the longest entry of GIT_CEILING_DIRECTORIES
// (list) that is a proper ancestor of dir, or -1: git's
// longest_ancestor_length over the entries as canonicalize_ceiling_entry
// keeps them (relative entries dropped; entries resolved to their real
// path unless an empty entry comes before them; an entry that cannot be
// resolved dropped). A root folder counts as length 0 ("/" less its
// slash), so that the root itself is not searched.
func ceilingLen(dir, list string) int {
	best := -1
	if list == "" {
		return best
	}
	resolve := true
	for _, c := range filepath.SplitList(list) {
		if c == "" {
			resolve = false
			continue
		}
		if !filepath.IsAbs(c) {
			continue
		}
		if resolve {
			r, err := filepath.EvalSymlinks(c)
			if err != nil {
				continue
			}
			c = r
		}
		c = filepath.Clean(c)
		n := len(strings.TrimRight(c, string(filepath.Separator)))
		if strings.HasPrefix(dir, c[:n]) && len(dir) > n+1 && os.IsPathSeparator(dir[n]) && n > best {
			best = n
		}
	}
	return best
}

// commonDir returns the git directory shared by the work trees of the
// repository whose ".git" entry is in top, reading it as git does: a
// ".git" folder is the git directory, a ".git" file names it ("gitdir:
// PATH", relative to top), and a "commondir" file in the git directory
// names the shared one (relative to the git directory).
func commonDir(top string) (string, error) {
	dotgit := filepath.Join(top, ".git")
	fi, err := os.Stat(dotgit)
	if err != nil {
		return "", err
	}
	gitDir := dotgit
	if !fi.IsDir() {
		b, err := os.ReadFile(dotgit)
		if err != nil {
			return "", err
		}
		line, _, _ := strings.Cut(string(b), "\n")
		p, ok := strings.CutPrefix(strings.TrimRight(line, "\r"), "gitdir: ")
		if !ok || p == "" {
			return "", fmt.Errorf("%s: not a gitdir file", dotgit)
		}
		if !filepath.IsAbs(p) {
			p = filepath.Join(top, p)
		}
		gitDir = p
	}
	b, err := os.ReadFile(filepath.Join(gitDir, "commondir"))
	if errors.Is(err, fs.ErrNotExist) {
		return gitDir, nil
	}
	if err != nil {
		return "", err
	}
	p := strings.TrimRight(string(b), "\r\n")
	if p == "" {
		return "", fmt.Errorf("%s: empty commondir", gitDir)
	}
	if !filepath.IsAbs(p) {
		p = filepath.Join(gitDir, p)
	}
	return p, nil
}

// shallowOnDisk reports whether the repository whose ".git" entry is in
// top is a shallow clone, as `git rev-parse --is-shallow-repository` does
// (is_repository_shallow: the file "shallow" in the common git directory
// can be opened). ok is false when the git directory cannot be read.
func shallowOnDisk(top string) (shallow, ok bool) {
	cd, err := commonDir(top)
	if err != nil {
		return false, false
	}
	if fi, err := os.Stat(cd); err != nil || !fi.IsDir() {
		return false, false
	}
	f, err := os.Open(filepath.Join(cd, "shallow"))
	if errors.Is(err, fs.ErrNotExist) {
		return false, true
	}
	if err != nil {
		return false, false
	}
	f.Close()
	return true, true
}

// blobID is the name git gives a blob of content: the SHA-1 (a 40-digit
// object name) or SHA-256 (64 digits, a repository in SHA-256 format) of
// "blob LEN\x00" and the bytes (gitformat-object). like is an object name
// of the repository, which tells the format; "" when it is neither.
func blobID(content []byte, like string) string {
	var h hash.Hash
	switch len(like) {
	case 40:
		h = sha1.New()
	case 64:
		h = sha256.New()
	default:
		return ""
	}
	fmt.Fprintf(h, "blob %d\x00", len(content))
	h.Write(content)
	return hex.EncodeToString(h.Sum(nil))
}
