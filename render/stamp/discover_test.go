package stamp

import (
	"bytes"
	"errors"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"calcdoc/render/stamp/gitrec"
)

// The references of these tests are git's own commands, run beside the
// stamp in the same environment: `git rev-parse --show-toplevel` (does
// git find a repository, and where), `git log -1 --format=%H / %cI`
// (the commit and its date), `git cat-file blob HEAD:FILE` and `git
// ls-tree HEAD -- FILE` (the committed bytes and the kind of entry),
// `git diff --cached --quiet` (a staged change), `git ls-files
// --error-unmatch` (the index holds it), `git check-ignore` and `git
// rev-parse --is-shallow-repository`. The count of git runs is read from
// a stand-in git on PATH that records each call and runs the real one.

// gitFinds reports whether git itself finds a repository from dir, with
// the environment of the test: `git rev-parse --show-toplevel` answers
// with the top folder, or fails with "not a git repository".
func gitFinds(t *testing.T, dir string) (string, bool) {
	t.Helper()
	cmd := exec.Command("git", "-C", dir, "rev-parse", "--show-toplevel")
	cmd.Env = append(os.Environ(), "LC_ALL=C")
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	out, err := cmd.Output()
	if err != nil {
		if !strings.Contains(stderr.String(), "not a git repository") {
			t.Fatalf("git rev-parse in %s: %v %s", dir, err, stderr.String())
		}
		return "", false
	}
	return strings.TrimSpace(string(out)), true
}

// Outside any repository the stamp runs no git, and says what git says.
func TestNoGitOutsideRepository(t *testing.T) {
	isolate(t)
	log := gitrec.Record(t)
	dir := t.TempDir()
	var paths []string
	for _, name := range []string{"a.md", "sub/b.md", "sub/deeper/c.md"} {
		p := filepath.Join(dir, filepath.FromSlash(name))
		write(t, p, "x = 1\n")
		paths = append(paths, p)
	}
	s := NewSession()
	for _, p := range paths {
		got := s.Of(p, []byte("x = 1\n"))
		if got.State != NoRepo || got.Detail != "not in a git repository; no commit recorded" || got.Commit != "" {
			t.Errorf("%s: %+v, want NoRepo", p, got)
		}
	}
	if c := gitrec.Calls(t, log); len(c) != 0 {
		t.Errorf("git ran %d times outside any repository: %q", len(c), c)
	}
	// the reference: git itself finds no repository there
	for _, p := range paths {
		if top, ok := gitFinds(t, filepath.Dir(p)); ok {
			t.Errorf("git finds the repository %s above %s", top, p)
		}
	}
}

// The walk stops where git stops: GIT_CEILING_DIRECTORIES as git reads
// it. Each case is held against git's own answer in the same folder with
// the same variable.
func TestFindRepoCeilings(t *testing.T) {
	isolate(t)
	base, err := filepath.EvalSymlinks(t.TempDir())
	if err != nil {
		t.Fatal(err)
	}
	repo := filepath.Join(base, "repo")
	deep := filepath.Join(repo, "s", "t")
	if err := os.MkdirAll(deep, 0o755); err != nil {
		t.Fatal(err)
	}
	initRepo(t, repo)
	link := filepath.Join(base, "link")
	if err := os.Symlink(filepath.Join(repo, "s"), link); err != nil {
		t.Fatal(err)
	}
	sep := string(os.PathListSeparator)
	for _, ceil := range []string{
		"",
		base,                     // above the repository: found
		repo,                     // the top itself: git does not look into it
		filepath.Join(repo, "s"), // between: not found
		deep,                     // the folder itself does not count
		deep + string(os.PathSeparator),
		"/",              // the root
		"relative/entry", // relative entries are dropped
		"/no/such/folder" + sep + filepath.Join(repo, "s"),
		link,       // resolved to repo/s
		sep + link, // after an empty entry: not resolved, so no ancestor
		filepath.Join(repo, "s") + sep + base,
	} {
		t.Run(ceil, func(t *testing.T) {
			t.Setenv("GIT_CEILING_DIRECTORIES", ceil)
			_, kind := findRepo(deep)
			top, gitOK := gitFinds(t, deep)
			if (kind != noRepo) != gitOK {
				t.Errorf("walk finds %v, git finds %v (%s)", kind != noRepo, gitOK, top)
			}
			write(t, filepath.Join(deep, "x.md"), "x\n")
			log := gitrec.Record(t)
			st := Of(filepath.Join(deep, "x.md"), []byte("x\n"))
			n := len(gitrec.Calls(t, log))
			if !gitOK && (n != 0 || st.State != NoRepo) {
				t.Errorf("git finds no repository, but the stamp ran git %d times and says %v", n, st.State)
			}
			if gitOK && st.State != Untracked {
				t.Errorf("git finds %s, but the stamp says %v (%s)", top, st.State, st.Detail)
			}
		})
	}
}

// What the stamp records equals what git's plain commands say, in the
// cases the one run of git log must read right: a change made by a merge
// (a conflict resolved), a file merged from a branch,
// an executable file, a link at HEAD where a file now stands, a file
// deleted at HEAD, a staged change, a SHA-256 repository, a linked work
// tree and a submodule (".git" files) and a shallow clone's work tree. A
// committed file takes one git run, a modified one two (the index once a
// repository), an untracked one at most four.
func TestStampFactsAsGitSays(t *testing.T) {
	isolate(t)
	base, err := filepath.EvalSymlinks(t.TempDir())
	if err != nil {
		t.Fatal(err)
	}
	repo := filepath.Join(base, "repo")
	if err := os.Mkdir(repo, 0o755); err != nil {
		t.Fatal(err)
	}
	initRepo(t, repo)
	write(t, filepath.Join(repo, "m.md"), "a\n")
	write(t, filepath.Join(repo, "exec.md"), "x = 1\n")
	write(t, filepath.Join(repo, "gone.md"), "g\n")
	write(t, filepath.Join(repo, "target.md"), "t\n")
	if err := os.Symlink("target.md", filepath.Join(repo, "was-link.md")); err != nil {
		t.Fatal(err)
	}
	if err := os.Chmod(filepath.Join(repo, "exec.md"), 0o755); err != nil {
		t.Fatal(err)
	}
	commit(t, repo, date1, "one", "m.md", "exec.md", "gone.md", "target.md", "was-link.md")
	// a merge whose resolution changes m.md
	git(t, repo, nil, "checkout", "-q", "-b", "side")
	write(t, filepath.Join(repo, "m.md"), "side\n")
	commit(t, repo, date1, "side", "m.md")
	git(t, repo, nil, "checkout", "-q", "main")
	write(t, filepath.Join(repo, "m.md"), "main\n")
	commit(t, repo, date2, "main", "m.md")
	cmd := exec.Command("git", "-C", repo, "merge", "-q", "side")
	cmd.Env = append(os.Environ(), "GIT_AUTHOR_DATE="+date2, "GIT_COMMITTER_DATE="+date2)
	if cmd.Run() == nil {
		t.Fatal("the merge should stop at a conflict")
	}
	write(t, filepath.Join(repo, "m.md"), "main and side\n")
	commit(t, repo, date2, "merge", "m.md")
	if p := git(t, repo, nil, "log", "-1", "--format=%P", "--", "m.md"); len(strings.Fields(p)) != 2 {
		t.Fatalf("m.md's last change is not the merge: parents %q", p)
	}
	// a file added on a branch and merged without conflict: its last
	// change is the branch's commit, not the merge
	git(t, repo, nil, "checkout", "-q", "-b", "topic", "HEAD~1")
	write(t, filepath.Join(repo, "topic.md"), "topic\n")
	commit(t, repo, date1, "topic", "topic.md")
	git(t, repo, nil, "checkout", "-q", "main")
	git(t, repo, []string{"GIT_AUTHOR_DATE=" + date2, "GIT_COMMITTER_DATE=" + date2}, "merge", "-q", "--no-edit", "topic")
	git(t, repo, nil, "rm", "-q", "gone.md")
	git(t, repo, []string{"GIT_AUTHOR_DATE=" + date2, "GIT_COMMITTER_DATE=" + date2}, "commit", "-q", "-m", "remove")
	// now: gone.md back as an untracked file, was-link.md a file, a staged change
	write(t, filepath.Join(repo, "gone.md"), "g\n")
	if err := os.Remove(filepath.Join(repo, "was-link.md")); err != nil {
		t.Fatal(err)
	}
	write(t, filepath.Join(repo, "was-link.md"), "target.md")
	write(t, filepath.Join(repo, "exec.md"), "x = 2\n")
	git(t, repo, nil, "add", "exec.md")

	repos := []string{repo}
	// a linked work tree (".git" is a file) of the same repository
	wt := filepath.Join(base, "wt")
	git(t, repo, nil, "worktree", "add", "-q", wt, "HEAD")
	repos = append(repos, wt)
	// a SHA-256 repository
	r256 := filepath.Join(base, "r256")
	if err := os.Mkdir(r256, 0o755); err != nil {
		t.Fatal(err)
	}
	if c := exec.Command("git", "-C", r256, "init", "-q", "--object-format=sha256"); c.Run() == nil {
		initRepo(t, r256)
		write(t, filepath.Join(r256, "m.md"), "a\n")
		commit(t, r256, date1, "one", "m.md")
		repos = append(repos, r256)
	} else {
		t.Log("this git makes no SHA-256 repository; that case is skipped")
	}
	// a shallow clone and a linked work tree of it
	clone := filepath.Join(base, "clone")
	git(t, base, nil, "clone", "-q", "--depth", "1", "file://"+repo, clone)
	cwt := filepath.Join(base, "clone-wt")
	git(t, clone, nil, "worktree", "add", "-q", cwt, "HEAD")
	repos = append(repos, clone, cwt)
	// a submodule
	super := filepath.Join(base, "super")
	if err := os.Mkdir(super, 0o755); err != nil {
		t.Fatal(err)
	}
	initRepo(t, super)
	git(t, super, nil, "-c", "protocol.file.allow=always", "submodule", "add", "-q", "file://"+repo, "sub")
	repos = append(repos, filepath.Join(super, "sub"))

	log := gitrec.Record(t)
	for _, r := range repos {
		s := NewSession()
		ents, err := os.ReadDir(r)
		if err != nil {
			t.Fatal(err)
		}
		for _, e := range ents {
			if !strings.HasSuffix(e.Name(), ".md") || !e.Type().IsRegular() {
				continue // links: the stamp follows them (TestOfInRepository)
			}
			p := filepath.Join(r, e.Name())
			src, err := os.ReadFile(p)
			if err != nil {
				t.Fatal(err)
			}
			gitrec.Calls(t, log)
			got := s.Of(p, src)
			n := len(gitrec.Calls(t, log))
			want := gitSays(t, r, e.Name(), src)
			t.Logf("%s: %v in %d git runs: %s", p, got.State, n, got.Detail)
			if got.State != want.State || got.Commit != want.Commit || got.CommitDate != want.CommitDate {
				t.Errorf("%s: stamp %v %s %s, git says %v %s %s (%s)", p, got.State, got.Commit, got.CommitDate, want.State, want.Commit, want.CommitDate, got.Detail)
			}
			for _, word := range want.words {
				if !strings.Contains(got.Detail, word) {
					t.Errorf("%s: Detail %q lacks %q", p, got.Detail, word)
				}
			}
			if strings.Contains(got.Detail, "shallow") != want.shallow && got.Commit != "" {
				t.Errorf("%s: Detail %q, shallow clone: %v", p, got.Detail, want.shallow)
			}
			if strings.Contains(got.Detail, "staged") != want.staged {
				t.Errorf("%s: Detail %q, staged: %v", p, got.Detail, want.staged)
			}
			limit := map[State]int{Clean: 1, Modified: 2, Untracked: 4}[want.State]
			if want.merge {
				limit++ // git ls-tree: git log shows no change of a merge
			}
			if n > limit {
				t.Errorf("%s: %d git runs, want at most %d", p, n, limit)
			}
		}
	}
}

// said is what git's plain commands say of a file.
type said struct {
	State              State
	Commit, CommitDate string
	shallow, staged    bool
	merge              bool // the last change is a merge commit
	words              []string
}

// gitSays asks git's plain commands about the file name in the work tree
// top whose bytes read are src.
func gitSays(t *testing.T, top, name string, src []byte) said {
	t.Helper()
	var w said
	tree := git(t, top, nil, "ls-tree", "HEAD", "--", name)
	if tree == "" {
		w.State = Untracked
		switch {
		case exec.Command("git", "-C", top, "ls-files", "--error-unmatch", "--", name).Run() == nil:
			w.words = []string{"index"}
		case exec.Command("git", "-C", top, "check-ignore", "-q", "--", name).Run() == nil:
			w.words = []string{"ignored"}
		default:
			w.words = []string{"not tracked"}
		}
		return w
	}
	w.Commit = git(t, top, nil, "log", "-1", "--format=%H", "--", name)
	w.CommitDate = git(t, top, nil, "log", "-1", "--format=%cI", "--", name)
	w.shallow = git(t, top, nil, "rev-parse", "--is-shallow-repository") == "true"
	w.merge = len(strings.Fields(git(t, top, nil, "log", "-1", "--format=%P", "--", name))) > 1
	cmd := exec.Command("git", "-C", top, "cat-file", "blob", "HEAD:"+name)
	committed, err := cmd.Output()
	if err != nil {
		t.Fatal(err)
	}
	if strings.HasPrefix(tree, "100") && bytes.Equal(committed, src) {
		w.State = Clean
		return w
	}
	w.State = Modified
	if strings.HasPrefix(tree, "100") {
		err := exec.Command("git", "-C", top, "diff", "--cached", "--quiet", "--", name).Run()
		var ee *exec.ExitError
		w.staged = errors.As(err, &ee) && ee.ExitCode() == 1
	} else {
		w.words = []string{"link or another kind"}
	}
	return w
}

// The shallow-clone test reads the git directory as git does: held
// against `git rev-parse --is-shallow-repository`.
func TestShallowOnDisk(t *testing.T) {
	isolate(t)
	base := t.TempDir()
	src := filepath.Join(base, "src")
	if err := os.Mkdir(src, 0o755); err != nil {
		t.Fatal(err)
	}
	initRepo(t, src)
	write(t, filepath.Join(src, "a.md"), "a\n")
	commit(t, src, date1, "a", "a.md")
	write(t, filepath.Join(src, "b.md"), "b\n")
	commit(t, src, date2, "b", "b.md")
	full := filepath.Join(base, "full")
	git(t, base, nil, "clone", "-q", "file://"+src, full)
	shallow := filepath.Join(base, "shallow")
	git(t, base, nil, "clone", "-q", "--depth", "1", "file://"+src, shallow)
	swt := filepath.Join(base, "shallow-wt")
	git(t, shallow, nil, "worktree", "add", "-q", swt, "HEAD")
	fwt := filepath.Join(base, "full-wt")
	git(t, full, nil, "worktree", "add", "-q", fwt, "HEAD")
	for _, top := range []string{src, full, shallow, swt, fwt} {
		got, ok := shallowOnDisk(top)
		want := git(t, top, nil, "rev-parse", "--is-shallow-repository") == "true"
		if !ok || got != want {
			t.Errorf("%s: shallowOnDisk = %v, %v; git says %v", top, got, ok, want)
		}
	}
}

// blobID is git's object name of a blob: held against `git hash-object`.
func TestBlobID(t *testing.T) {
	isolate(t)
	dir := t.TempDir()
	r256 := t.TempDir()
	has256 := exec.Command("git", "-C", r256, "init", "-q", "--object-format=sha256").Run() == nil
	for _, text := range []string{"", "x = 1\n", "θ = 30°\r\n", "\x00\xff"} {
		for _, d := range []string{dir, r256} {
			if d == r256 && !has256 {
				continue // this git makes no SHA-256 repository
			}
			write(t, filepath.Join(d, "f"), text)
			want := git(t, d, nil, "hash-object", "--no-filters", "f")
			if got := blobID([]byte(text), want); got != want {
				t.Errorf("%q: blobID %s, git hash-object %s", text, got, want)
			}
		}
	}
}
