package main

import (
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"strings"
	"testing"
)

// diffRepo is a temporary git repository with one committed document.
func diffRepo(t *testing.T, doc string) (dir string, git func(args ...string) string) {
	t.Helper()
	if _, err := exec.LookPath("git"); err != nil {
		t.Skip("git is not installed")
	}
	dir = t.TempDir()
	git = func(args ...string) string {
		t.Helper()
		cmd := exec.Command("git", args...)
		cmd.Dir = dir
		out, err := cmd.CombinedOutput()
		if err != nil {
			t.Fatalf("git %v: %v\n%s", args, err, out)
		}
		return string(out)
	}
	git("init", "-q")
	git("config", "user.name", "Test Engineer")
	git("config", "user.email", "test@example.invalid")
	git("config", "commit.gpgsign", "false")
	write(t, dir, "load.md", doc)
	git("add", "-A")
	git("commit", "-q", "-m", "first")
	return dir, git
}

// the scenario (our own): a 230 V supply into a resistance
const diffDoc = "```calc\nR = 10 Ω\nI = 230 V / R\ncheck I <= 32 A\n```\n"

// TestDiffExitStatus: 0 nothing changed, 1 something changed, 2 usage,
// 3 an error.
func TestDiffExitStatus(t *testing.T) {
	dir, git := diffRepo(t, diffDoc)
	doc := filepath.Join(dir, "load.md")
	if st, out, errs := runCLI("diff", doc); st != exitOK || out != "" {
		t.Errorf("no change: status %d, out %q, err %q", st, out, errs)
	}
	write(t, dir, "load.md", strings.Replace(diffDoc, "10 Ω", "8 Ω", 1))
	// hand derivation: I = 230 V / 10 Ω = 23 A → 230 V / 8 Ω = 28.75 A,
	// +25 %; R 10 → 8 Ω, −20 %
	st, out, errs := runCLI("diff", doc)
	if st != exitCheckFail {
		t.Errorf("a change: status %d, want 1 (%s)", st, errs)
	}
	for _, want := range []string{"load.md: changed input R: 10.00 Ω → 8.000 Ω (-20 %)\n", "load.md: changed result I: 23.00 A → 28.75 A (+25 %)\n"} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
	// --min-change above 25 % hides every change: nothing changed
	if st, out, _ := runCLI("diff", "--min-change", "30%", doc); st != exitOK || out != "" {
		t.Errorf("--min-change 30%%: status %d, out %q", st, out)
	}
	// --from/--to between commits, --html written
	git("commit", "-q", "-am", "second")
	page := filepath.Join(t.TempDir(), "cmp.html")
	if st, out, errs := runCLI("diff", "--from", "HEAD~1", "--to", "HEAD", "--html", page, doc); st != exitCheckFail || !strings.Contains(out, "(+25 %)") {
		t.Errorf("HEAD~1..HEAD: status %d, out %q, err %q", st, out, errs)
	}
	if b, err := os.ReadFile(page); err != nil || !strings.Contains(string(b), "28.75 A") {
		t.Errorf("the page: %v", err)
	}
	// usage
	for _, args := range [][]string{{"diff"}, {"diff", "--min-change", "0.1", doc}, {"diff", "--min-change", "-1%", doc}, {"diff", "--bogus", doc}} {
		if st, _, _ := runCLI(args...); st != exitUsage {
			t.Errorf("%v: status %d, want 2", args, st)
		}
	}
	// errors: a document that does not evaluate, a bad revision, outside git
	write(t, dir, "load.md", "```calc\nR = 10 ohms\n```\n")
	if st, out, _ := runCLI("diff", doc); st != exitError || !strings.Contains(out, "does not evaluate at working tree") {
		t.Errorf("failing document: status %d, out %q", st, out)
	}
	if st, _, _ := runCLI("diff", "--from", "no-such-revision", doc); st != exitError {
		t.Errorf("bad revision: status %d", st)
	}
	outside := write(t, t.TempDir(), "x.md", diffDoc)
	if st, _, _ := runCLI("diff", outside); st != exitError {
		t.Errorf("outside git: status %d", st)
	}
	// textconv always exits 0
	if st, out, _ := runCLI("diff", "--textconv", filepath.Join(dir, "none.md")); st != exitOK || !strings.Contains(out, "cannot be read") {
		t.Errorf("textconv of no file: %d %q", st, out)
	}
}

// TestDiffTextconvGit: git's own diff, with calcdoc configured as the
// textconv driver of *.md, shows the values that changed.
func TestDiffTextconvGit(t *testing.T) {
	if testing.Short() {
		t.Skip("builds the binary")
	}
	dir, git := diffRepo(t, diffDoc)
	bin := filepath.Join(t.TempDir(), "calcdoc")
	if runtime.GOOS == "windows" {
		bin += ".exe"
	}
	if out, err := exec.Command("go", "build", "-o", bin, ".").CombinedOutput(); err != nil {
		t.Fatalf("%v\n%s", err, out)
	}
	// the README's set-up
	write(t, dir, ".gitattributes", "*.md diff=calcdoc\n")
	git("config", "diff.calcdoc.textconv", filepath.ToSlash(bin)+" diff --textconv")
	write(t, dir, "load.md", strings.Replace(diffDoc, "10 Ω", "8 Ω", 1))
	git("add", "-A")
	git("commit", "-q", "-m", "second")
	out := git("diff", "HEAD~1", "HEAD", "--", "load.md")
	// hand derivation: 230 V / 10 Ω = 23 A → 230 V / 8 Ω = 28.75 A
	for _, want := range []string{"-result I = 23.00 A\n", "+result I = 28.75 A\n", "-input R = 10.00 Ω\n", "+input R = 8.000 Ω\n"} {
		if !strings.Contains(out, want) {
			t.Errorf("git diff lacks %q:\n%s", want, out)
		}
	}
	if strings.Contains(out, "```calc") {
		t.Errorf("git diff shows the source, not the values:\n%s", out)
	}
}
