package build

import (
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
	"calcdoc/render"
	"calcdoc/render/stamp/gitrec"
)

// The references here: git's own commands (`git diff --quiet -- FILE`
// says whether a file differs from what is committed) and the calls a
// stand-in git on PATH records before it runs the real one.

// recordGit isolates git from the user's configuration, keeps
// repositories above the test's folders out (GIT_CEILING_DIRECTORIES),
// and records each git call (gitrec.Record).
func recordGit(t *testing.T) string {
	t.Helper()
	t.Setenv("GIT_CONFIG_GLOBAL", os.DevNull)
	t.Setenv("GIT_CONFIG_NOSYSTEM", "1")
	t.Setenv("GIT_CEILING_DIRECTORIES", filepath.Dir(t.TempDir()))
	return gitrec.Record(t)
}

// stampFolder builds the stamps of every document of dir as the command
// does: git asked for every input before evaluation (Prefetch), each
// stamp joined when its sheet is drawn.
func stampFolder(t *testing.T, dir string) map[string]*render.StampInfo {
	t.Helper()
	inputs, err := Collect([]string{dir}, kind.Standard())
	if err != nil {
		t.Fatal(err)
	}
	st := NewStamper("test")
	st.Prefetch(inputs)
	var mu sync.Mutex
	out := map[string]*render.StampInfo{}
	Evaluate(NewLoader(kind.Standard(), inputs), inputs, 0, func(i int, doc *calcdoc.Document) {
		opt := st.Stamped(doc)
		mu.Lock()
		out[inputs[i].Rel] = opt.Stamp
		mu.Unlock()
	})
	return out
}

// A folder outside any repository is built without running git once.
func TestBuildRunsNoGitOutsideRepository(t *testing.T) {
	log := recordGit(t)
	dir, _ := genFolder(t, 3, 4)
	stamps := stampFolder(t, dir)
	if len(stamps) != 12 {
		t.Fatalf("%d stamps, want 12", len(stamps))
	}
	for rel, s := range stamps {
		if s.State != render.TreeNoRepo {
			t.Errorf("%s: %v (%s), want no-repo", rel, s.State, s.Detail)
		}
	}
	if c := gitrec.Calls(t, log); len(c) != 0 {
		t.Errorf("git ran %d times: %q", len(c), c)
	}
}

// In a repository each document takes one git log; the index is listed
// once for the whole folder, however many documents are modified.
func TestBuildSharesRepositoryFacts(t *testing.T) {
	log := recordGit(t)
	dir, _ := genFolder(t, 2, 4)
	run := func(args ...string) {
		t.Helper()
		cmd := exec.Command("git", append([]string{"-C", dir}, args...)...)
		if out, err := cmd.CombinedOutput(); err != nil {
			t.Fatalf("git %v: %v\n%s", args, err, out)
		}
	}
	run("init", "-q")
	run("add", ".")
	run("-c", "user.name=T", "-c", "user.email=t@example.invalid", "commit", "-q", "-m", "sheets")
	modified := []string{"s00-01.md", "s01-02.md", "s01-03.md"}
	for _, m := range modified {
		f, err := os.OpenFile(filepath.Join(dir, m), os.O_APPEND|os.O_WRONLY, 0)
		if err != nil {
			t.Fatal(err)
		}
		f.WriteString("\nA changed line.\n")
		f.Close()
	}
	os.Remove(log)
	stamps := stampFolder(t, dir)
	logs, lsFiles := 0, 0
	for _, c := range gitrec.Calls(t, log) {
		switch {
		case strings.Contains(c, " log -1 "):
			logs++
		case strings.Contains(c, " ls-files "):
			lsFiles++
		default:
			t.Errorf("unexpected git call: %s", c)
		}
	}
	if logs != len(stamps) || lsFiles != 1 {
		t.Errorf("%d git log and %d git ls-files for %d documents, %d of them modified; want %d and 1", logs, lsFiles, len(stamps), len(modified), len(stamps))
	}
	for rel, s := range stamps {
		// the reference: git diff --quiet exits 1 for a file that differs
		err := exec.Command("git", "-C", dir, "diff", "--quiet", "--", rel).Run()
		want := render.TreeClean
		if err != nil {
			want = render.TreeModified
		}
		if s.State != want {
			t.Errorf("%s: %v (%s), git diff says %v", rel, s.State, s.Detail, want)
		}
	}
}
