package diff

import (
	"bytes"
	"errors"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
)

// Repo is the git repository that holds the documents: its top folder,
// links followed.
type Repo struct {
	Top string
}

// OpenRepo finds the repository that holds dir (`git rev-parse
// --show-toplevel`).
func OpenRepo(dir string) (*Repo, error) {
	out, err := run(dir, "rev-parse", "--show-toplevel")
	if err != nil {
		return nil, fmt.Errorf("%s is not inside a git repository: diff compares revisions that git holds (%v)", dir, err)
	}
	top := filepath.FromSlash(strings.TrimSpace(string(out)))
	if r, err := filepath.EvalSymlinks(top); err == nil {
		top = r
	}
	return &Repo{Top: top}, nil
}

// run runs git with args in dir and returns its standard output; an error
// carries git's standard error.
func run(dir string, args ...string) ([]byte, error) {
	cmd := exec.Command("git", args...)
	cmd.Dir = dir
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	out, err := cmd.Output()
	if err != nil {
		msg := strings.TrimSpace(stderr.String())
		if msg == "" {
			msg = err.Error()
		}
		return nil, errors.New(msg)
	}
	return out, nil
}

// Revision is one side of a comparison: a git revision, or the working
// tree (Rev "").
type Revision struct {
	Rev    string // as given; "" for the working tree
	Commit string // the full commit hash; "" for the working tree
	Date   string // the commit's date (ISO 8601, as git gives it)
}

// Label names the revision in the output.
func (r Revision) Label() string {
	if r.Rev == "" {
		return "working tree"
	}
	return r.Rev
}

// Resolve checks that rev names a commit and reads its hash and date;
// rev "" is the working tree.
func (g *Repo) Resolve(rev string) (Revision, error) {
	if rev == "" {
		return Revision{}, nil
	}
	if strings.HasPrefix(rev, "-") {
		return Revision{}, fmt.Errorf("%q is not a revision", rev)
	}
	out, err := run(g.Top, "log", "-1", "--format=%H%x00%cI", rev+"^{commit}", "--")
	if err != nil {
		return Revision{}, fmt.Errorf("%s is not a commit of the repository at %s: %v", rev, g.Top, err)
	}
	h, d, _ := strings.Cut(strings.TrimSpace(string(out)), "\x00")
	return Revision{Rev: rev, Commit: h, Date: d}, nil
}

// Rel is the path p (absolute, under Top) relative to the top, with /,
// as git names it.
func (g *Repo) Rel(p string) (string, error) {
	r, err := filepath.Rel(g.Top, p)
	if err != nil || r == ".." || strings.HasPrefix(r, ".."+string(filepath.Separator)) {
		return "", fmt.Errorf("%s is outside the repository at %s", p, g.Top)
	}
	return filepath.ToSlash(r), nil
}

// ErrMissing is the error of a file that is not at a revision.
var ErrMissing = errors.New("no such file at this revision")

// Read reads the file at absolute path p at revision rev (`git show
// REV:PATH`), or from the working tree when rev is "".
func (g *Repo) Read(rev Revision, p string) ([]byte, error) {
	if rev.Commit == "" {
		b, err := os.ReadFile(p)
		if errors.Is(err, os.ErrNotExist) {
			return nil, ErrMissing
		}
		return b, err
	}
	rel, err := g.Rel(p)
	if err != nil {
		return nil, err
	}
	if _, err := run(g.Top, "cat-file", "-e", rev.Commit+":"+rel); err != nil {
		return nil, ErrMissing
	}
	return run(g.Top, "show", rev.Commit+":"+rel)
}

// List lists the .md files under the folder dir (absolute) at rev, as
// absolute paths, sorted.
func (g *Repo) List(rev Revision, dir string) ([]string, error) {
	if rev.Commit == "" {
		var out []string
		err := filepath.WalkDir(dir, func(p string, d os.DirEntry, err error) error {
			if err != nil {
				return err
			}
			if d.IsDir() && d.Name() == ".git" {
				return filepath.SkipDir
			}
			if !d.IsDir() && strings.EqualFold(filepath.Ext(p), ".md") {
				out = append(out, p)
			}
			return nil
		})
		return out, err
	}
	rel, err := g.Rel(dir)
	if err != nil {
		return nil, err
	}
	args := []string{"ls-tree", "-r", "--name-only", "-z", rev.Commit}
	if rel != "." {
		args = append(args, "--", rel+"/")
	}
	b, err := run(g.Top, args...)
	if err != nil {
		return nil, err
	}
	var out []string
	for _, f := range strings.Split(string(b), "\x00") {
		if f != "" && strings.EqualFold(filepath.Ext(f), ".md") {
			out = append(out, filepath.Join(g.Top, filepath.FromSlash(f)))
		}
	}
	return out, nil
}
