// Package stamp records what traces a calculation sheet to its source: the
// SHA-256 of the source bytes and, when the source lives in a git work tree,
// the commit that last changed it and whether the bytes read are the bytes
// committed at HEAD.
//
// Of never fails: every problem with git (not installed, not a repository, a
// timeout, an unreadable repository) becomes a State and a Detail sentence
// that the sheet prints, so a build goes on and the sheet says honestly how
// far it can be traced.
package stamp

import (
	"bytes"
	"calcdoc/render/markup"
	"context"
	"errors"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"time"

	"calcdoc/render"
)

// State says how the source bytes relate to git; the sheet writer holds
// the type, as it shows it.
type State = render.TreeState

// The states, as render defines them.
const (
	Unknown   = render.TreeUnknown
	Clean     = render.TreeClean
	Modified  = render.TreeModified
	Untracked = render.TreeUntracked
	NoRepo    = render.TreeNoRepo
	NoGit     = render.TreeNoGit
)

// Stamp traces one source file: the sheet writer's plain record
// (render.StampInfo), which Of fills in.
type Stamp = render.StampInfo

// Timeout bounds each git command that Of runs; a command that has not
// answered by then is killed and the stamp is Unknown.
const Timeout = 5 * time.Second

// timeout is Timeout; the tests shorten it.
var timeout = Timeout

// Hash returns the lower-case hexadecimal SHA-256 digest (FIPS 180-4) of
// src: 64 characters, the same as the first field that `sha256sum` prints.
func Hash(src []byte) string { return render.SourceHash(src) }

// Of stamps the source file at path whose bytes, as the caller read them,
// are src. It runs git in the file's own work tree (found from the file's
// real directory after resolving symbolic links), and no git at all when
// no repository holds that directory (discover.go); it never fails:
// problems become State and Detail. A build stamps its files through one
// Session, which shares the repository's facts among them. The comparison that decides Clean is made on src,
// not on the file as it is now on disk, so a sheet is never called Clean
// unless the exact bytes it was computed from are the bytes at HEAD.
//
// The blob at HEAD is compared without git's filters (no end-of-line or
// smudge conversion): a working copy whose line endings git converts on
// checkout is Modified, since the committed bytes, whose SHA-256 a reader
// can recompute from the commit, are not the bytes the sheet was made from.
func Of(path string, src []byte) Stamp { return NewSession().Of(path, src) }

// notInRepo is the Detail of a file no repository holds.
const notInRepo = "not in a git repository; no commit recorded"

// shallowNote ends the Detail of a commit found in a shallow clone.
const shallowNote = " (in a shallow clone, so the change may be older than this commit)"

// slowOf stamps file (absolute, links resolved, a regular file) by the full
// sequence of git commands: the work tree, HEAD, HEAD's entry, the blob,
// the last commit, the clone's depth and the index, one run each. A
// session uses it where its one run of git log does not settle the facts
// (no commit yet, an error, a file git places elsewhere).
func slowOf(g runner, st Stamp, file string, src []byte) Stamp {
	dir := filepath.Dir(file)

	top, err := g.run(dir, "rev-parse", "--show-toplevel")
	if err != nil {
		var ge *gitError
		if errors.As(err, &ge) && strings.Contains(ge.stderr, "not a git repository") {
			st.State = NoRepo
			st.Detail = notInRepo
			return st
		}
		return unknown(st, err)
	}
	topDir := strings.TrimRight(string(top), "\r\n")
	if t, err := filepath.EvalSymlinks(topDir); err == nil {
		topDir = t
	}
	rel, ok := relInTree(topDir, file)
	if !ok {
		st.State = Unknown
		st.Detail = fmt.Sprintf("git places the file outside its work tree %s; no commit recorded", topDir)
		return st
	}
	index := func() (string, bool, error) { return g.indexBlob(topDir, rel) }

	// The blob of the file at HEAD, if HEAD exists and holds the file.
	headBlob, kind, err := g.headEntry(topDir, rel)
	if err != nil {
		return unknown(st, err)
	}
	if kind == absent {
		u := untracked(g, topDir, rel, index)
		st.State, st.Detail = u.State, u.Detail
		return st
	}
	var content []byte
	if kind == regular {
		if content, err = g.run(topDir, "cat-file", "blob", headBlob); err != nil {
			return unknown(st, err)
		}
	}

	out, err := g.run(topDir, "log", "-1", "--format=%H%x00%cI", "--", rel)
	if err != nil {
		return unknown(st, err)
	}
	hash, date, ok := strings.Cut(strings.TrimRight(string(out), "\r\n"), "\x00")
	if !ok || hash == "" {
		st.State = Unknown
		st.Detail = "HEAD holds the file but git names no commit that changed it; no commit recorded"
		return st
	}
	st.Commit, st.CommitDate = hash, date
	shallow := ""
	if out, err := g.run(topDir, "rev-parse", "--is-shallow-repository"); err == nil &&
		strings.TrimSpace(string(out)) == "true" {
		shallow = shallowNote
	}

	if kind == regular && bytes.Equal(content, src) {
		st.State = Clean
		st.Detail = fmt.Sprintf("source is as committed in %s of %s%s", markup.ShortHash(hash), date, shallow)
		return st
	}
	return modified(st, kind, hash, date, shallow, headBlob, index)
}

// modified fills st for bytes that are not HEAD's entry, whose last
// commit is hash of date; index looks up the file's index entry.
func modified(st Stamp, kind entryKind, hash, date, shallow, headBlob string, index func() (string, bool, error)) Stamp {
	st.State = Modified
	if kind == other {
		st.Detail = fmt.Sprintf("source is a regular file where its last commit %s of %s%s holds a link or another kind of entry: uncommitted change",
			markup.ShortHash(hash), date, shallow)
		return st
	}
	staged := ""
	if idx, ok, err := index(); err == nil && ok && idx != headBlob {
		staged = ", partly or wholly staged"
	}
	st.Detail = fmt.Sprintf("source differs from its last commit %s of %s%s: uncommitted changes%s",
		markup.ShortHash(hash), date, shallow, staged)
	return st
}

// untracked is the State and Detail of a file that HEAD does not hold;
// index looks up its index entry.
func untracked(g runner, topDir, rel string, index func() (string, bool, error)) Stamp {
	st := Stamp{State: Untracked}
	if _, ok, err := index(); err == nil && ok {
		st.Detail = "source is added to git's index but never committed; no commit recorded"
		return st
	}
	// check-ignore exits 0 when the path is ignored and 1 when it is not.
	// It takes no pathspec magic, so it runs without literal pathspecs
	// (its arguments are paths matched against the ignore patterns).
	if _, err := g.runPaths(topDir, false, nil, "check-ignore", "-q", "--", rel); err == nil {
		st.Detail = "source is ignored by git; no commit recorded"
		return st
	}
	st.Detail = "source is not tracked by git; no commit recorded"
	return st
}

func unknown(st Stamp, err error) Stamp {
	st.State = Unknown
	st.Detail = fmt.Sprintf("git could not tell the source's commit (%v); no commit recorded", err)
	return st
}

// relInTree returns the path of file relative to the work tree topDir as
// git names it: with "/" as separator on every system (git's pathspecs and
// tree entries use "/", Windows' "\" included); ok is false when file is
// not below topDir. topDir may be written with "/" where the system uses
// "\" (Git for Windows prints C:/...): filepath.Rel cleans both.
func relInTree(topDir, file string) (rel string, ok bool) {
	r, err := filepath.Rel(topDir, file)
	if err != nil || r == "." || r == ".." || strings.HasPrefix(r, ".."+string(filepath.Separator)) || filepath.IsAbs(r) {
		return "", false
	}
	return filepath.ToSlash(r), true
}

// resolve returns the absolute path of path with every symbolic link
// resolved, so that git runs in the directory that really holds the file.
func resolve(path string) (string, error) {
	if path == "" {
		return "", errors.New("empty path")
	}
	abs, err := filepath.Abs(path)
	if err != nil {
		return "", err
	}
	return filepath.EvalSymlinks(abs)
}

// runner runs git commands with a timeout, no pager, no prompts, no optional
// locks and C-locale messages.
type runner struct {
	git string
	sem chan struct{} // when not nil, held while git runs
}

type gitError struct {
	args     []string
	err      error
	stderr   string
	timedOut bool
}

func (e *gitError) Error() string {
	msg := fmt.Sprintf("git %s: %v", strings.Join(e.args, " "), e.err)
	if e.stderr != "" {
		msg += ": " + e.stderr
	}
	return msg
}

func (e *gitError) Unwrap() error { return e.err }

// droppedEnv lists the variables Of never passes on to git: those that
// would make git look for the repository elsewhere than the file's own
// directory (as inside a git hook), those that change how pathspecs are
// read, and those Of sets itself.
var droppedEnv = map[string]bool{
	"GIT_DIR": true, "GIT_WORK_TREE": true, "GIT_INDEX_FILE": true, "GIT_OBJECT_DIRECTORY": true,
	"GIT_ALTERNATE_OBJECT_DIRECTORIES": true, "GIT_COMMON_DIR": true, "GIT_NAMESPACE": true,
	"GIT_PREFIX":            true,
	"GIT_LITERAL_PATHSPECS": true, "GIT_GLOB_PATHSPECS": true, "GIT_NOGLOB_PATHSPECS": true,
	"GIT_ICASE_PATHSPECS": true,
	"LC_ALL":              true, "LANGUAGE": true, "GIT_PAGER": true, "PAGER": true,
	"GIT_OPTIONAL_LOCKS": true, "GIT_TERMINAL_PROMPT": true,
}

// gitEnv is the process environment without droppedEnv, plus C-locale
// messages (Of reads git's "not a git repository"), no pager, no prompt
// and no optional locks (Of only reads; it must not write the index).
func gitEnv() []string {
	var env []string
	for _, kv := range os.Environ() {
		name, _, _ := strings.Cut(kv, "=")
		if !droppedEnv[name] {
			env = append(env, kv)
		}
	}
	return append(env,
		"LC_ALL=C", "LANGUAGE=C", "GIT_PAGER=cat", "PAGER=cat",
		"GIT_OPTIONAL_LOCKS=0", "GIT_TERMINAL_PROMPT=0")
}

// run runs `git -C dir ARGS` with every pathspec taken literally (no glob
// or magic) and returns its standard output.
func (g runner) run(dir string, args ...string) ([]byte, error) {
	return g.runPaths(dir, true, nil, args...)
}

// runArgs is run with git's options opts (say "-c", "NAME=VALUE") before
// the command.
func (g runner) runArgs(dir string, opts []string, args ...string) ([]byte, error) {
	return g.runPaths(dir, true, opts, args...)
}

// runPaths runs `git -C dir OPTS ARGS`, with literal pathspecs if literal.
func (g runner) runPaths(dir string, literal bool, opts []string, args ...string) ([]byte, error) {
	if g.sem != nil {
		g.sem <- struct{}{}
		defer func() { <-g.sem }()
	}
	ctx, cancel := context.WithTimeout(context.Background(), timeout)
	defer cancel()
	full := []string{"--no-pager"}
	if literal {
		full = append(full, "--literal-pathspecs")
	}
	full = append(full,
		"-c", "core.quotePath=false", "-c", "log.showSignature=false", "-c", "log.follow=false")
	full = append(full, opts...)
	full = append(full, "-C", dir)
	full = append(full, args...)
	cmd := exec.CommandContext(ctx, g.git, full...)
	cmd.Env = gitEnv()
	cmd.WaitDelay = time.Second
	var stdout, stderr bytes.Buffer
	cmd.Stdout = &stdout
	cmd.Stderr = &stderr
	err := cmd.Run()
	if ctx.Err() == context.DeadlineExceeded {
		return nil, &gitError{args: args, err: fmt.Errorf("no answer within %v", timeout), timedOut: true}
	}
	if err != nil {
		msg := strings.TrimSpace(stderr.String())
		if len(msg) > 500 {
			msg = msg[:500] + "…"
		}
		return nil, &gitError{args: args, err: err, stderr: msg}
	}
	return stdout.Bytes(), nil
}

// entryKind is what HEAD holds at a path.
type entryKind int

const (
	absent  entryKind = iota // no commit yet, or no entry at the path
	regular                  // a regular or executable file (mode 100644 or 100755)
	other                    // a symbolic link, submodule or other entry
)

// headEntry returns the object name and kind of HEAD's entry at rel.
func (g runner) headEntry(topDir, rel string) (string, entryKind, error) {
	if _, err := g.run(topDir, "rev-parse", "--verify", "--quiet", "HEAD^{commit}"); err != nil {
		var ge *gitError
		var ee *exec.ExitError
		if errors.As(err, &ge) && errors.As(ge.err, &ee) && ee.ExitCode() == 1 {
			return "", absent, nil // unborn HEAD: no commit yet
		}
		return "", absent, err
	}
	out, err := g.run(topDir, "ls-tree", "-z", "--full-tree", "HEAD", "--", rel)
	if err != nil {
		return "", absent, err
	}
	return parseEntry(out, rel)
}

// indexBlob returns the object name of the file's stage-0 entry in the
// index; ok is false when the index does not hold it.
func (g runner) indexBlob(topDir, rel string) (blob string, ok bool, err error) {
	out, err := g.run(topDir, "ls-files", "-z", "--stage", "--full-name", "--", rel)
	if err != nil {
		return "", false, err
	}
	// Each entry: "<mode> <object> <stage>\t<path>\x00".
	for _, e := range bytes.Split(out, []byte{0}) {
		meta, p, found := strings.Cut(string(e), "\t")
		if !found || p != rel {
			continue
		}
		f := strings.Fields(meta)
		if len(f) == 3 && f[2] == "0" {
			return f[1], true, nil
		}
		if len(f) == 3 {
			return "", true, nil // unmerged: held, but no single blob
		}
	}
	return "", false, nil
}

// parseEntry reads `git ls-tree -z` output: "<mode> <type> <object>\t<path>\x00".
func parseEntry(out []byte, rel string) (string, entryKind, error) {
	for _, e := range bytes.Split(out, []byte{0}) {
		meta, p, found := strings.Cut(string(e), "\t")
		if !found || p != rel {
			continue
		}
		f := strings.Fields(meta)
		if len(f) != 3 {
			return "", absent, fmt.Errorf("git ls-tree: unreadable entry %q", string(e))
		}
		if f[1] == "blob" && (f[0] == "100644" || f[0] == "100755") {
			return f[2], regular, nil
		}
		return f[2], other, nil
	}
	return "", absent, nil
}
