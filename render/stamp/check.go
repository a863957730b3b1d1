package stamp

import (
	"calcdoc/render/markup"
	"fmt"
	"os/exec"
	"path/filepath"
	"strings"
)

// GitCheck is what Check found when it held a sheet's recorded git facts
// against the repository that holds the source.
type GitCheck struct {
	// Applies is false when Check could not hold the facts against git:
	// no commit recorded, git not installed, or the recorded path does
	// not lead to a file in a git work tree. Why then says so.
	Applies bool
	Why     string
	// Repo is the work tree's top folder and Rel the source's path in it.
	Repo, Rel string
	// Problems are the recorded facts that git contradicts, one sentence
	// each; none when every fact holds.
	Problems []string
}

// NoCommitRecorded is GitCheck.Why for a sheet that records no commit
// (nothing to hold against git).
const NoCommitRecorded = "the sheet records no commit"

// Check holds a sheet's recorded stamp against git. candidates are the
// paths at which the source may be found (the recorded path taken from
// the current folder, then from the sheet's folder); the first that is a
// regular file in a git work tree is used. src is the source the sheet
// carries. It checks that the recorded commit exists, that it changed
// the file (it is the file's last change as of itself), that its
// committer date is the recorded one, and that the state is true: the
// source at the commit (git cat-file blob COMMIT:PATH, no filters) is
// byte for byte the embedded source when the sheet says clean, and
// differs from it when the sheet says modified.
func Check(st Stamp, src []byte, candidates ...string) GitCheck {
	if st.Commit == "" {
		return GitCheck{Why: NoCommitRecorded}
	}
	gitPath, err := exec.LookPath("git")
	if err != nil {
		return GitCheck{Why: "git is not installed"}
	}
	g := runner{git: gitPath}
	var c GitCheck
	for _, p := range candidates {
		file, err := resolve(p)
		if err != nil {
			continue
		}
		top, err := g.run(filepath.Dir(file), "rev-parse", "--show-toplevel")
		if err != nil {
			continue
		}
		topDir := strings.TrimRight(string(top), "\r\n")
		if t, err := filepath.EvalSymlinks(topDir); err == nil {
			topDir = t
		}
		rel, ok := relInTree(topDir, file)
		if !ok {
			continue
		}
		c = GitCheck{Applies: true, Repo: topDir, Rel: rel}
		break
	}
	if !c.Applies {
		return GitCheck{Why: "the recorded source path does not lead to a file in a git work tree"}
	}
	bad := func(format string, args ...any) { c.Problems = append(c.Problems, fmt.Sprintf(format, args...)) }
	if !validCommit(st.Commit) {
		bad("the recorded commit %q is not a full commit hash", st.Commit)
		return c
	}
	if _, err := g.run(c.Repo, "cat-file", "-e", st.Commit+"^{commit}"); err != nil {
		bad("the repository %s holds no commit %s, which the sheet records", c.Repo, st.Commit)
		return c
	}
	out, err := g.run(c.Repo, "log", "-1", "--format=%H%x00%cI", st.Commit, "--", c.Rel)
	if err != nil {
		bad("git cannot read the history of %s at %s: %v", c.Rel, markup.ShortHash(st.Commit), err)
		return c
	}
	last, date, _ := strings.Cut(strings.TrimRight(string(out), "\r\n"), "\x00")
	switch {
	case last == "":
		bad("commit %s does not hold %s, but the sheet records it as the file's last commit", markup.ShortHash(st.Commit), c.Rel)
		return c
	case last != st.Commit:
		bad("commit %s did not change %s (its last change by then was %s), but the sheet records it as the file's last commit", markup.ShortHash(st.Commit), c.Rel, markup.ShortHash(last))
	}
	if st.Commit == last && date != st.CommitDate {
		bad("commit %s is dated %s, but the sheet records %s", markup.ShortHash(st.Commit), date, orNone(st.CommitDate))
	}
	blob, kind, err := g.entry(c.Repo, st.Commit, c.Rel)
	if err != nil {
		bad("git cannot read %s at %s: %v", c.Rel, markup.ShortHash(st.Commit), err)
		return c
	}
	var committed []byte
	if kind == regular {
		if committed, err = g.run(c.Repo, "cat-file", "blob", blob); err != nil {
			bad("git cannot read %s at %s: %v", c.Rel, markup.ShortHash(st.Commit), err)
			return c
		}
	}
	same := kind == regular && string(committed) == string(src)
	switch {
	case st.State == Clean && !same:
		h := "not a regular file"
		if kind == regular {
			h = "SHA-256 " + Hash(committed)
		}
		bad("the sheet says the source is clean (as committed in %s), but %s at that commit is %s, not the embedded source's %s", markup.ShortHash(st.Commit), c.Rel, h, Hash(src))
	case st.State == Modified && same:
		bad("the sheet says the source has uncommitted changes, but the embedded source is byte for byte %s at %s", c.Rel, markup.ShortHash(st.Commit))
	case st.State != Clean && st.State != Modified:
		bad("the sheet records commit %s with the working-tree state %q, which records no commit", markup.ShortHash(st.Commit), st.State)
	}
	return c
}

func orNone(s string) string {
	if s == "" {
		return "none"
	}
	return s
}

func validCommit(s string) bool {
	if len(s) != 40 && len(s) != 64 {
		return false
	}
	for _, c := range s {
		if !(c >= '0' && c <= '9' || c >= 'a' && c <= 'f') {
			return false
		}
	}
	return true
}

// entry returns the object name and kind of rev's tree entry at rel.
func (g runner) entry(topDir, rev, rel string) (string, entryKind, error) {
	out, err := g.run(topDir, "ls-tree", "-z", "--full-tree", rev, "--", rel)
	if err != nil {
		return "", absent, err
	}
	return parseEntry(out, rel)
}
