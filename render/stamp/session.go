package stamp

import (
	"bytes"
	"errors"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"strings"
	"sync"

	"calcdoc/render/markup"
)

// Session stamps the files of one build. What git says of a repository
// (its index, whether it is a shallow clone) is asked once and shared by
// every file of that repository, and each file's own facts are asked as
// soon as its path is known (Start), on a goroutine, so that git runs
// while the document is evaluated; Pending.Stamp joins it and compares
// the bytes read. A session is safe for use by several goroutines.
//
// What git is asked, for a file in a repository: one run of
//
//	git log -1 -z --raw --format=%H%x00%cI -- FILE
//
// gives the commit that last changed the file and its committer date (the
// same commit as `git log -1 -- FILE`: the same history walk; an option
// that shows merges' changes, such as --diff-merges, would change the
// walk), and the file's change in that commit, whose new side is the
// file's entry at HEAD (the commits after it leave the file as it is): its
// mode (a regular file, a link or another entry) and its blob. A merge
// that changed the file shows no change: then `git ls-tree HEAD -- FILE`
// gives the entry. The bytes read are compared
// with the blob by its object name (blobID), not by reading the blob. A
// modified file also needs the index (is the change staged?): one `git
// ls-files --stage` a repository. A file HEAD does not hold needs the
// index and, when the index does not hold it either, `git check-ignore`.
// Anything unexpected (no commit yet, an error, a file git places
// elsewhere) falls back to the full sequence of commands (slowOf), so
// the stamp is the same in every case.
type Session struct {
	look    sync.Once
	gitPath string
	sem     chan struct{} // bounds the git processes running at once

	mu      sync.Mutex
	pending map[string]*Pending
	repos   map[string]*repoFacts
}

// NewSession makes a session.
func NewSession() *Session {
	return &Session{
		sem:     make(chan struct{}, max(2, runtime.GOMAXPROCS(0))),
		pending: map[string]*Pending{},
		repos:   map[string]*repoFacts{},
	}
}

// Pending is the stamp of one file being asked of git.
type Pending struct {
	s    *Session
	done chan struct{}
	f    gitFacts
}

// gitFacts are what a Pending learned without the bytes.
type gitFacts struct {
	final     *Stamp // the stamp, whatever the bytes (no git, no repository, ...)
	file      string // the file, absolute, links resolved
	slow      bool   // run the full sequence with the bytes (slowOf)
	top, rel  string
	repo      *repoFacts
	kind      entryKind
	blob      string // HEAD's entry
	commit    string
	date      string
	shallow   string // the note of a shallow clone, or ""
	untracked Stamp  // kind absent: State and Detail
}

// Of stamps the source file at path whose bytes, as the caller read them,
// are src: a session of one file (see Session).
func (s *Session) Of(path string, src []byte) Stamp { return s.Start(path).Stamp(src) }

// Start begins asking git about the file at path and returns at once.
// Starting the same path again returns the same Pending.
func (s *Session) Start(path string) *Pending {
	s.mu.Lock()
	defer s.mu.Unlock()
	if p := s.pending[path]; p != nil {
		return p
	}
	p := &Pending{s: s, done: make(chan struct{})}
	s.pending[path] = p
	go func() {
		defer close(p.done)
		p.f = s.facts(path)
	}()
	return p
}

// Stamp waits for git's facts and stamps the file's bytes src.
func (p *Pending) Stamp(src []byte) Stamp { return p.StampSum(src, Hash(src)) }

// StampSum is Stamp of src whose hash the caller has made: sum is
// Hash(src).
func (p *Pending) StampSum(src []byte, sum string) Stamp {
	<-p.done
	st := Stamp{SHA256: sum}
	f := &p.f
	if f.final != nil {
		st.State, st.Detail = f.final.State, f.final.Detail
		return st
	}
	g := runner{git: p.s.gitPath, sem: p.s.sem}
	if f.slow {
		return slowOf(g, st, f.file, src)
	}
	if f.kind == absent {
		st.State, st.Detail = f.untracked.State, f.untracked.Detail
		return st
	}
	st.Commit, st.CommitDate = f.commit, f.date
	if f.kind == regular && blobID(src, f.blob) == f.blob {
		st.State = Clean
		st.Detail = fmt.Sprintf("source is as committed in %s of %s%s", markup.ShortHash(f.commit), f.date, f.shallow)
		return st
	}
	return modified(st, f.kind, f.commit, f.date, f.shallow, f.blob, func() (string, bool, error) {
		return f.repo.indexBlob(g, f.rel)
	})
}

// facts asks git what can be known of the file at path without its bytes.
func (s *Session) facts(path string) gitFacts {
	s.look.Do(func() {
		if p, err := exec.LookPath("git"); err == nil {
			s.gitPath = p
		}
	})
	if s.gitPath == "" {
		return gitFacts{final: &Stamp{State: NoGit, Detail: "git is not installed; no commit recorded"}}
	}
	g := runner{git: s.gitPath, sem: s.sem}
	file, early := examine(path)
	if early != nil {
		return gitFacts{final: early}
	}
	dir := filepath.Dir(file)
	top, k := findRepo(dir)
	switch k {
	case noRepo:
		return gitFacts{final: &Stamp{State: NoRepo, Detail: notInRepo}}
	case gitDirLike:
		return gitFacts{file: file, slow: true}
	}
	rel, ok := relInTree(top, file)
	if !ok {
		return gitFacts{file: file, slow: true}
	}
	f := gitFacts{file: file, top: top, rel: rel, repo: s.repo(top)}
	ch, err := g.lastChange(dir, filepath.Base(file))
	var ge *gitError
	switch {
	case errors.As(err, &ge) && ge.timedOut:
		return gitFacts{final: ptrStamp(unknown(Stamp{}, err))}
	case err != nil, ch.found && !ch.noRecord && ch.rel != rel:
		// no commit yet, a repository git will not use, a work tree
		// elsewhere, ...: the full sequence says what it is
		return gitFacts{file: file, slow: true}
	case !ch.found:
		// no commit changed the file: HEAD does not hold it. Where is the
		// work tree? git says (core.worktree may place it elsewhere).
		t, err := g.run(dir, "rev-parse", "--show-toplevel")
		if err != nil {
			return gitFacts{file: file, slow: true}
		}
		topDir := strings.TrimRight(string(t), "\r\n")
		if t, err := filepath.EvalSymlinks(topDir); err == nil {
			topDir = t
		}
		if topDir != top {
			return gitFacts{file: file, slow: true}
		}
		f.kind = absent
	case ch.noRecord:
		// the last change is a merge, whose change git log does not
		// show: HEAD's entry is asked of git ls-tree
		out, err := g.run(dir, "ls-tree", "-z", "--full-name", "HEAD", "--", filepath.Base(file))
		if err != nil {
			return gitFacts{file: file, slow: true}
		}
		blob, kind, err := parseEntry(out, rel)
		if err != nil || kind == absent {
			return gitFacts{file: file, slow: true}
		}
		f.kind, f.blob = kind, blob
	default:
		f.kind, f.blob = ch.kind, ch.blob
	}
	if f.kind == absent {
		f.untracked = untracked(g, top, rel, func() (string, bool, error) { return f.repo.indexBlob(g, rel) })
		return f
	}
	f.commit, f.date = ch.commit, ch.date
	if f.repo.isShallow(g) {
		f.shallow = shallowNote
	}
	return f
}

func ptrStamp(st Stamp) *Stamp { return &st }

// repo returns the shared facts of the repository whose work tree is top.
func (s *Session) repo(top string) *repoFacts {
	s.mu.Lock()
	defer s.mu.Unlock()
	r := s.repos[top]
	if r == nil {
		r = &repoFacts{top: top}
		s.repos[top] = r
	}
	return r
}

// repoFacts are what git says of one repository, asked once a session.
type repoFacts struct {
	top string

	shallowOnce sync.Once
	shallow     bool

	indexOnce sync.Once
	index     map[string]indexEntry
	indexErr  error
}

// indexEntry is the index's entry of a path: its stage-0 blob, or none
// when the path is unmerged.
type indexEntry struct{ blob string }

// isShallow reports whether the repository is a shallow clone: read from
// its git directory (shallowOnDisk), or asked of git when that cannot be
// read.
func (r *repoFacts) isShallow(g runner) bool {
	r.shallowOnce.Do(func() {
		if sh, ok := shallowOnDisk(r.top); ok {
			r.shallow = sh
			return
		}
		out, err := g.run(r.top, "rev-parse", "--is-shallow-repository")
		r.shallow = err == nil && strings.TrimSpace(string(out)) == "true"
	})
	return r.shallow
}

// indexBlob returns the object name of the stage-0 entry of rel in the
// index (one `git ls-files --stage` for the repository); ok is false when
// the index does not hold rel, and the name is "" when rel is unmerged.
func (r *repoFacts) indexBlob(g runner, rel string) (string, bool, error) {
	r.indexOnce.Do(func() {
		out, err := g.run(r.top, "ls-files", "-z", "--stage", "--full-name")
		if err != nil {
			r.indexErr = err
			return
		}
		r.index = map[string]indexEntry{}
		// Each entry: "<mode> <object> <stage>\t<path>\x00", sorted by
		// path, then stage.
		for _, e := range bytes.Split(out, []byte{0}) {
			meta, p, found := strings.Cut(string(e), "\t")
			f := strings.Fields(meta)
			if !found || len(f) != 3 {
				continue
			}
			if _, seen := r.index[p]; seen {
				continue
			}
			if f[2] == "0" {
				r.index[p] = indexEntry{blob: f[1]}
			} else {
				r.index[p] = indexEntry{} // unmerged: held, but no single blob
			}
		}
	})
	if r.indexErr != nil {
		return "", false, r.indexErr
	}
	e, ok := r.index[rel]
	return e.blob, ok, nil
}

// change is the last change of a file: its commit and committer date, and
// the file's entry after it (HEAD's entry).
type change struct {
	found        bool // a commit changed the file
	commit, date string
	rel          string // the path git names, from the top of the work tree
	noRecord     bool   // the commit is a merge: the entry is not known
	kind         entryKind
	blob         string
}

// lastChange runs `git log -1 --raw` for the file base in dir (see
// Session). A commit whose change cannot be read is an error.
func (g runner) lastChange(dir, base string) (change, error) {
	out, err := g.runArgs(dir, []string{"-c", "log.showRoot=true"}, "log", "-1", "-z", "--no-abbrev", "--no-color",
		"--no-renames", "--no-relative", "--no-ext-diff",
		"--format=%H%x00%cI", "--raw", "--", base)
	if err != nil {
		return change{}, err
	}
	if len(out) == 0 {
		return change{}, nil
	}
	bad := func() (change, error) {
		return change{}, fmt.Errorf("git log: unreadable output %q", truncate(string(out), 200))
	}
	hash, rest, ok1 := strings.Cut(string(out), "\x00")
	date, rest, ok2 := strings.Cut(rest, "\x00")
	if !ok1 || !ok2 || hash == "" || date == "" {
		return bad()
	}
	rest = strings.TrimLeft(rest, "\n")
	if strings.Trim(rest, "\x00\n") == "" {
		c := change{found: true, commit: hash, date: date, noRecord: true}
		return c, nil // a merge: git log shows no change of a merge
	}
	// One record a changed path: ":<old mode> <new mode> <old> <new> <status>\x00<path>\x00".
	fields := strings.Split(rest, "\x00")
	c := change{found: true, commit: hash, date: date}
	if len(fields) < 2 {
		return bad()
	}
	meta, p := fields[0], fields[1]
	f := strings.Fields(strings.TrimPrefix(meta, ":"))
	if !strings.HasPrefix(meta, ":") || len(f) != 5 {
		return bad()
	}
	for _, left := range fields[2:] {
		if strings.Trim(left, "\n") != "" {
			return bad() // one path asked, one record expected
		}
	}
	c.rel = p
	switch newMode, newBlob, status := f[1], f[3], f[4]; {
	case status == "D":
		c.kind = absent
	case newMode == "100644" || newMode == "100755":
		c.kind, c.blob = regular, newBlob
	default:
		c.kind, c.blob = other, newBlob
	}
	return c, nil
}

func truncate(s string, n int) string {
	if len(s) > n {
		return s[:n] + "…"
	}
	return s
}

// examine resolves path and checks that it is a regular file; a stamp
// when it cannot be traced.
func examine(path string) (string, *Stamp) {
	file, err := resolve(path)
	if err != nil {
		return "", &Stamp{State: Unknown, Detail: fmt.Sprintf("the source path cannot be resolved (%v); no commit recorded", err)}
	}
	if fi, err := os.Stat(file); err != nil || !fi.Mode().IsRegular() {
		if err != nil {
			return "", &Stamp{State: Unknown, Detail: fmt.Sprintf("the source file cannot be examined (%v); no commit recorded", err)}
		}
		return "", &Stamp{State: Unknown, Detail: "the source path is not a regular file; no commit recorded"}
	}
	return file, nil
}
