package stamp

import (
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"strings"
	"testing"
	"time"
)

// The references here are outside calcdoc: FIPS 180-2 / NIST CAVP test vectors and GNU
// coreutils' sha256sum for the digests, and git's own command line
// (`git log -1 --format=... -- FILE`) for the commits and dates.

// Fixed commit dates, so that CommitDate can also be checked against the
// date git was told to record.
const (
	date1 = "2024-03-05T10:20:30+01:00"
	date2 = "2024-04-11T08:00:00+02:00"
)

// isolate keeps the user's and the system's git configuration, and any
// repository above the temporary directories, out of the tests. Of inherits
// the same environment.
func isolate(t *testing.T) {
	t.Helper()
	if _, err := exec.LookPath("git"); err != nil {
		t.Skip("git is not installed; on Debian: apt-get install git")
	}
	t.Setenv("GIT_CONFIG_GLOBAL", os.DevNull)
	t.Setenv("GIT_CONFIG_NOSYSTEM", "1")
	t.Setenv("GIT_CEILING_DIRECTORIES", filepath.Dir(t.TempDir()))
}

// git runs git in dir and returns its trimmed standard output.
func git(t *testing.T, dir string, env []string, args ...string) string {
	t.Helper()
	cmd := exec.Command("git", append([]string{"-C", dir}, args...)...)
	cmd.Env = append(os.Environ(), env...)
	out, err := cmd.Output()
	if err != nil {
		msg := ""
		if ee, ok := err.(*exec.ExitError); ok {
			msg = string(ee.Stderr)
		}
		t.Fatalf("git %s: %v %s", strings.Join(args, " "), err, msg)
	}
	return strings.TrimRight(string(out), "\n")
}

func initRepo(t *testing.T, dir string) {
	t.Helper()
	git(t, dir, nil, "-c", "init.defaultBranch=main", "init", "-q")
	git(t, dir, nil, "config", "user.name", "Stamp Test")
	git(t, dir, nil, "config", "user.email", "stamp-test@example.invalid")
	git(t, dir, nil, "config", "commit.gpgsign", "false")
}

func commit(t *testing.T, dir, date, msg string, paths ...string) {
	t.Helper()
	git(t, dir, nil, append([]string{"add", "--"}, paths...)...)
	git(t, dir, []string{"GIT_AUTHOR_DATE=" + date, "GIT_COMMITTER_DATE=" + date},
		"commit", "-q", "-m", msg)
}

func write(t *testing.T, path, text string) {
	t.Helper()
	if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
}

// sha256sum returns the digest GNU coreutils' sha256sum prints for path.
func sha256sum(t *testing.T, path string) (string, bool) {
	t.Helper()
	if _, err := exec.LookPath("sha256sum"); err != nil {
		t.Log("sha256sum (GNU coreutils) is not installed; the digest is not checked against it")
		return "", false
	}
	out, err := exec.Command("sha256sum", "--", path).Output()
	if err != nil {
		t.Fatalf("sha256sum %s: %v", path, err)
	}
	f := strings.Fields(string(out))
	if len(f) == 0 {
		t.Fatalf("sha256sum %s printed nothing", path)
	}
	// sha256sum escapes a name holding a backslash or newline with a leading '\'.
	return strings.TrimPrefix(f[0], `\`), true
}

func TestHash(t *testing.T) {
	tests := []struct {
		name string
		in   string
		want string
	}{
		// FIPS 180-2, Appendix B.1: one-block message "abc".
		{"fips abc", "abc", "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"},
		// FIPS 180-2, Appendix B.2: two-block message.
		{"fips two blocks", "abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq",
			"248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1"},
		// NIST CAVP SHAVS vectors, SHA256ShortMsg.rsp, Len = 0.
		{"empty", "", "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := Hash([]byte(tc.in)); got != tc.want {
				t.Errorf("Hash(%q) = %s, want %s", tc.in, got, tc.want)
			}
		})
	}
	// The same digests as GNU coreutils' sha256sum of the same files.
	dir := t.TempDir()
	for _, tc := range []struct{ name, text string }{
		{"ascii", "V_a = 230 V\n"},
		{"utf8", "θ = 30°, Z = 4+3j Ω\r\n"},
		{"binary", "\x00\xff\x10\n\x00"},
	} {
		t.Run("sha256sum "+tc.name, func(t *testing.T) {
			p := filepath.Join(dir, tc.name+".md")
			write(t, p, tc.text)
			want, ok := sha256sum(t, p)
			if !ok {
				t.Skip("sha256sum is missing (GNU coreutils); on Debian: apt-get install coreutils")
			}
			if got := Hash([]byte(tc.text)); got != want {
				t.Errorf("Hash = %s, sha256sum = %s", got, want)
			}
		})
	}
}

func TestOfInRepository(t *testing.T) {
	isolate(t)
	repo := filepath.Join(t.TempDir(), "repo")
	if err := os.Mkdir(repo, 0o755); err != nil {
		t.Fatal(err)
	}
	initRepo(t, repo)

	// Commit 1 (date1): the files whose last change is commit 1.
	write(t, filepath.Join(repo, "sub dir", "a b.md"), "# feeder\n\nV = 11 kV\n")
	write(t, filepath.Join(repo, "mod.md"), "I = 10 A\n")
	write(t, filepath.Join(repo, "staged.md"), "S = 1 kVA\n")
	write(t, filepath.Join(repo, "weird *[x]:name.md"), "literal name\n")
	write(t, filepath.Join(repo, ".gitignore"), "ignored.md\n")
	commit(t, repo, date1, "first", "sub dir/a b.md", "mod.md", "staged.md", "weird *[x]:name.md", ".gitignore")
	// Commit 2 (date2): other files only. "weird zx:name.md" would match the
	// name above if it were taken as a glob pattern.
	write(t, filepath.Join(repo, "other.md"), "P = 1 kW\n")
	write(t, filepath.Join(repo, "weird zx:name.md"), "glob bait\n")
	commit(t, repo, date2, "second", "other.md", "weird zx:name.md")

	// Changes after the last commit.
	write(t, filepath.Join(repo, "mod.md"), "I = 12 A\n")
	write(t, filepath.Join(repo, "staged.md"), "S = 2 kVA\n")
	git(t, repo, nil, "add", "--", "staged.md")
	write(t, filepath.Join(repo, "new.md"), "never added\n")
	write(t, filepath.Join(repo, "added.md"), "added only\n")
	git(t, repo, nil, "add", "--", "added.md")
	write(t, filepath.Join(repo, "ignored.md"), "ignored\n")
	// A link inside the repository to a committed file, and a link from
	// outside to the repository's folder.
	if err := os.Symlink(filepath.Join("sub dir", "a b.md"), filepath.Join(repo, "link.md")); err != nil {
		t.Fatal(err)
	}
	outside := t.TempDir()
	if err := os.Symlink(repo, filepath.Join(outside, "via")); err != nil {
		t.Fatal(err)
	}

	head := git(t, repo, nil, "rev-parse", "HEAD")
	tests := []struct {
		name string
		path string // as given to Of
		// rel is the file git tracks, for `git log -- rel`; "" when no commit
		// is expected.
		rel    string
		chdir  string // working directory for the call, "" to keep it
		src    *string
		want   State
		detail string // a word Detail must hold
	}{
		{name: "committed, path with spaces", path: filepath.Join(repo, "sub dir", "a b.md"),
			rel: "sub dir/a b.md", want: Clean, detail: "committed"},
		{name: "committed in commit 2", path: filepath.Join(repo, "other.md"),
			rel: "other.md", want: Clean, detail: "committed"},
		{name: "name with glob characters", path: filepath.Join(repo, "weird *[x]:name.md"),
			rel: "weird *[x]:name.md", want: Clean, detail: "committed"},
		{name: "relative path", path: "a b.md", chdir: filepath.Join(repo, "sub dir"),
			rel: "sub dir/a b.md", want: Clean, detail: "committed"},
		{name: "relative path with dot-dot", path: filepath.Join("..", "other.md"), chdir: filepath.Join(repo, "sub dir"),
			rel: "other.md", want: Clean, detail: "committed"},
		{name: "symlink to committed file", path: filepath.Join(repo, "link.md"),
			rel: "sub dir/a b.md", want: Clean, detail: "committed"},
		{name: "through a linked folder", path: filepath.Join(outside, "via", "sub dir", "a b.md"),
			rel: "sub dir/a b.md", want: Clean, detail: "committed"},
		{name: "modified in work tree", path: filepath.Join(repo, "mod.md"),
			rel: "mod.md", want: Modified, detail: "uncommitted"},
		{name: "modified and staged", path: filepath.Join(repo, "staged.md"),
			rel: "staged.md", want: Modified, detail: "staged"},
		{name: "bytes read differ from the clean file", path: filepath.Join(repo, "other.md"),
			src: ptr("P = 2 kW\n"), rel: "other.md", want: Modified, detail: "uncommitted"},
		{name: "untracked", path: filepath.Join(repo, "new.md"), want: Untracked, detail: "not tracked"},
		{name: "added, never committed", path: filepath.Join(repo, "added.md"), want: Untracked, detail: "index"},
		{name: "ignored", path: filepath.Join(repo, "ignored.md"), want: Untracked, detail: "ignored"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if tc.chdir != "" {
				t.Chdir(tc.chdir)
			}
			disk, err := os.ReadFile(tc.path)
			if err != nil {
				t.Fatal(err)
			}
			src := disk
			if tc.src != nil {
				src = []byte(*tc.src)
			}
			got := Of(tc.path, src)
			t.Logf("Detail: %s", got.Detail)
			if got.State != tc.want {
				t.Fatalf("State = %v (%s), want %v", got.State, got.Detail, tc.want)
			}
			if !strings.Contains(got.Detail, tc.detail) {
				t.Errorf("Detail = %q, want it to mention %q", got.Detail, tc.detail)
			}
			if tc.src == nil {
				if want, ok := sha256sum(t, tc.path); ok && got.SHA256 != want {
					t.Errorf("SHA256 = %s, sha256sum = %s", got.SHA256, want)
				}
			} else {
				p := filepath.Join(t.TempDir(), "src")
				write(t, p, *tc.src)
				if want, ok := sha256sum(t, p); ok && got.SHA256 != want {
					t.Errorf("SHA256 = %s, sha256sum of the bytes read = %s", got.SHA256, want)
				}
			}
			if tc.rel == "" {
				if got.Commit != "" || got.CommitDate != "" {
					t.Errorf("Commit, CommitDate = %q, %q, want none", got.Commit, got.CommitDate)
				}
				return
			}
			// ":(literal)" keeps git from taking "*[x]" as a glob.
			wantCommit := git(t, repo, nil, "log", "-1", "--format=%H", "--", ":(literal)"+tc.rel)
			wantDate := git(t, repo, nil, "log", "-1", "--format=%cI", "--", ":(literal)"+tc.rel)
			if got.Commit != wantCommit {
				t.Errorf("Commit = %q, git log = %q", got.Commit, wantCommit)
			}
			if got.CommitDate != wantDate {
				t.Errorf("CommitDate = %q, git log = %q", got.CommitDate, wantDate)
			}
		})
	}

	// The files of commit 1 carry commit 1, not HEAD, and the date git was
	// told to record.
	s := Of(filepath.Join(repo, "mod.md"), []byte("I = 10 A\n"))
	if s.State != Clean || s.Commit == head || s.CommitDate != date1 {
		t.Errorf("mod.md as committed: %+v, want Clean, a commit other than HEAD %s, date %s", s, head, date1)
	}
	if s := Of(filepath.Join(repo, "other.md"), []byte("P = 1 kW\n")); s.Commit != head || s.CommitDate != date2 {
		t.Errorf("other.md: %+v, want HEAD %s of %s", s, head, date2)
	}
	// The name with glob characters was last changed in commit 1, although
	// as a glob it would also match "weird zx:name.md" of commit 2 (HEAD).
	if s := Of(filepath.Join(repo, "weird *[x]:name.md"), []byte("literal name\n")); s.Commit == head || s.CommitDate != date1 {
		t.Errorf("weird *[x]:name.md: %+v, want commit 1 of %s", s, date1)
	}
	// Inside a git hook GIT_DIR and GIT_INDEX_FILE name the hook's own
	// repository; the stamp still comes from the file's own repository.
	hookRepo := t.TempDir()
	initRepo(t, hookRepo)
	write(t, filepath.Join(hookRepo, "h.md"), "h\n")
	commit(t, hookRepo, date2, "hook", "h.md")
	wantCommit := git(t, repo, nil, "log", "-1", "--format=%H", "--", "sub dir/a b.md")
	t.Setenv("GIT_DIR", filepath.Join(hookRepo, ".git"))
	t.Setenv("GIT_INDEX_FILE", filepath.Join(hookRepo, ".git", "index"))
	if s := Of(filepath.Join(repo, "sub dir", "a b.md"), []byte("# feeder\n\nV = 11 kV\n")); s.State != Clean || s.Commit != wantCommit {
		t.Errorf("with GIT_DIR set: %+v, want Clean at %s", s, wantCommit)
	}
}

func ptr(s string) *string { return &s }

func TestOfOutsideRepository(t *testing.T) {
	isolate(t)

	t.Run("no commit yet", func(t *testing.T) {
		repo := t.TempDir()
		initRepo(t, repo)
		p := filepath.Join(repo, "calc.md")
		write(t, p, "x = 1\n")
		got := Of(p, []byte("x = 1\n"))
		if got.State != Untracked || got.Commit != "" {
			t.Errorf("got %+v, want Untracked without commit", got)
		}
	})

	t.Run("not a repository", func(t *testing.T) {
		dir := t.TempDir()
		p := filepath.Join(dir, "calc sheet.md")
		write(t, p, "x = 1\n")
		got := Of(p, []byte("x = 1\n"))
		if got.State != NoRepo || got.Commit != "" {
			t.Fatalf("got %+v, want NoRepo", got)
		}
		if got.Detail != "not in a git repository; no commit recorded" {
			t.Errorf("Detail = %q", got.Detail)
		}
		if want, ok := sha256sum(t, p); ok && got.SHA256 != want {
			t.Errorf("SHA256 = %s, sha256sum = %s", got.SHA256, want)
		}
	})

	t.Run("no git in PATH", func(t *testing.T) {
		dir := t.TempDir()
		p := filepath.Join(dir, "calc.md")
		write(t, p, "x = 1\n")
		want, haveSum := sha256sum(t, p)
		t.Setenv("PATH", t.TempDir())
		got := Of(p, []byte("x = 1\n"))
		if got.State != NoGit || got.Commit != "" {
			t.Fatalf("got %+v, want NoGit", got)
		}
		if got.Detail != "git is not installed; no commit recorded" {
			t.Errorf("Detail = %q", got.Detail)
		}
		if haveSum && got.SHA256 != want {
			t.Errorf("SHA256 = %s, sha256sum = %s", got.SHA256, want)
		}
	})

	t.Run("missing file", func(t *testing.T) {
		got := Of(filepath.Join(t.TempDir(), "gone.md"), []byte("x"))
		if got.State != Unknown || got.Commit != "" || got.Detail == "" {
			t.Errorf("got %+v, want Unknown with a Detail", got)
		}
	})

	t.Run("a folder, not a file", func(t *testing.T) {
		got := Of(t.TempDir(), nil)
		if got.State != Unknown || got.Detail == "" {
			t.Errorf("got %+v, want Unknown with a Detail", got)
		}
	})

	t.Run("shallow clone", func(t *testing.T) {
		src := filepath.Join(t.TempDir(), "src")
		if err := os.Mkdir(src, 0o755); err != nil {
			t.Fatal(err)
		}
		initRepo(t, src)
		write(t, filepath.Join(src, "a.md"), "a\n")
		commit(t, src, date1, "a", "a.md")
		write(t, filepath.Join(src, "b.md"), "b\n")
		commit(t, src, date2, "b", "b.md")
		clone := filepath.Join(t.TempDir(), "clone")
		git(t, src, nil, "clone", "-q", "--depth", "1", "file://"+src, clone)
		got := Of(filepath.Join(clone, "a.md"), []byte("a\n"))
		// In the clone git sees only the tip commit: it holds the same bytes
		// but is not where the file last changed, and Detail says so.
		wantCommit := git(t, clone, nil, "log", "-1", "--format=%H", "--", "a.md")
		if got.State != Clean || got.Commit != wantCommit || !strings.Contains(got.Detail, "shallow") {
			t.Errorf("got %+v, want Clean at %s with a shallow-clone note", got, wantCommit)
		}
	})
}

// fakeGit puts a git that runs script first in PATH.
func fakeGit(t *testing.T, script string) {
	t.Helper()
	dir := t.TempDir()
	if err := os.WriteFile(filepath.Join(dir, "git"), []byte("#!/bin/sh\n"+script+"\n"), 0o755); err != nil {
		t.Fatal(err)
	}
	t.Setenv("PATH", dir+string(os.PathListSeparator)+os.Getenv("PATH"))
}

func TestOfGitFails(t *testing.T) {
	if runtime.GOOS == "windows" {
		t.Skip("the stand-in git is a shell script, which Windows does not run as git.exe")
	}
	if _, err := exec.LookPath("sh"); err != nil {
		t.Skip("no sh to run a stand-in git")
	}
	// A ".git" folder beside the file: the stamp finds a repository
	// there without git (discover.go) and asks the stand-in git about it.
	dir := t.TempDir()
	if err := os.Mkdir(filepath.Join(dir, ".git"), 0o755); err != nil {
		t.Fatal(err)
	}
	p := filepath.Join(dir, "calc.md")
	write(t, p, "x = 1\n")
	// The failing git is given a long time to answer, so that a loaded
	// machine starting the script slowly does not turn its error into a
	// time-out; the hanging one a short time.
	tests := []struct {
		name    string
		script  string
		timeout time.Duration
		detail  string // Detail must hold it
	}{
		{"git errors", `echo "fatal: object store damaged" >&2; exit 128`, 20 * time.Second, "object store damaged"},
		{"git hangs", `exec sleep 30`, 300 * time.Millisecond, "no answer within"},
	}
	saved := timeout
	t.Cleanup(func() { timeout = saved })
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			timeout = tc.timeout
			fakeGit(t, tc.script)
			got := Of(p, []byte("x = 1\n"))
			if got.State != Unknown || got.Commit != "" || !strings.Contains(got.Detail, tc.detail) {
				t.Errorf("got %+v, want Unknown with %q in Detail", got, tc.detail)
			}
		})
	}
}

func TestStateString(t *testing.T) {
	tests := []struct {
		s    State
		want string
	}{
		{Unknown, "unknown"}, {Clean, "clean"}, {Modified, "modified"},
		{Untracked, "untracked"}, {NoRepo, "no-repo"}, {NoGit, "no-git"}, {State(42), "State(42)"},
	}
	for _, tc := range tests {
		t.Run(tc.want, func(t *testing.T) {
			if got := tc.s.String(); got != tc.want {
				t.Errorf("String() = %q, want %q", got, tc.want)
			}
		})
	}
}

// TestRelInTree: the path handed to git is relative to the work tree and
// written with "/" on every system (git names tree entries with "/"); a
// file outside the tree, or the tree itself, has none. The inputs are
// joined with this system's separator, so the test checks the conversion
// on Windows as on Linux.
func TestRelInTree(t *testing.T) {
	top := filepath.Join(t.TempDir(), "repo")
	for _, tc := range []struct {
		file string
		want string // "" for not in the tree
	}{
		{filepath.Join(top, "a.md"), "a.md"},
		{filepath.Join(top, "calc", "sub", "a.md"), "calc/sub/a.md"},
		{filepath.Join(top, "..x.md"), "..x.md"}, // a name that begins with two dots is in the tree
		{filepath.Join(top, "..", "other", "a.md"), ""},
		{top, ""},
		{filepath.Dir(top), ""},
	} {
		got, ok := relInTree(top, tc.file)
		if ok != (tc.want != "") || got != tc.want {
			t.Errorf("relInTree(%q, %q) = %q, %v; want %q", top, tc.file, got, ok, tc.want)
		}
	}
	if runtime.GOOS == "windows" {
		// Git for Windows prints the top folder with "/": C:/Users/...
		got, ok := relInTree(filepath.ToSlash(top), filepath.Join(top, "sub", "a.md"))
		if !ok || got != "sub/a.md" {
			t.Errorf("with a /-written top folder: %q, %v", got, ok)
		}
	}
}
