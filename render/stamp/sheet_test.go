package stamp

import (
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
	"calcdoc/render"
	"calcdoc/render/internal/sheettest"
)

// The outside references of the stamp tests: git's own command line
// (`git rev-parse HEAD`, `git log -1 --format=%H -- FILE`) for the commit,
// and GNU coreutils' sha256sum for the hash of the file.

// stampGitEnv keeps the user's and the system's git configuration, and any
// repository above the temporary folders, out of the tests.
func stampGitEnv(t *testing.T) {
	t.Helper()
	if _, err := exec.LookPath("git"); err != nil {
		t.Skip("git is not installed; on Debian: apt-get install git")
	}
	t.Setenv("GIT_CONFIG_GLOBAL", os.DevNull)
	t.Setenv("GIT_CONFIG_NOSYSTEM", "1")
	t.Setenv("GIT_CEILING_DIRECTORIES", filepath.Dir(t.TempDir()))
}

func stampGit(t *testing.T, dir string, args ...string) string {
	t.Helper()
	cmd := exec.Command("git", append([]string{"-C", dir}, args...)...)
	cmd.Env = append(os.Environ(), "GIT_AUTHOR_DATE=2026-11-02T09:30:00+01:00", "GIT_COMMITTER_DATE=2026-11-02T09:30:00+01:00")
	out, err := cmd.CombinedOutput()
	if err != nil {
		t.Fatalf("git %s: %v\n%s", strings.Join(args, " "), err, out)
	}
	return strings.TrimSpace(string(out))
}

func coreutilsSHA256(t *testing.T, path string) string {
	t.Helper()
	return sheettest.Sha256sum(t, path)
}

const stampDoc = sheettest.HeaterDoc

// builtSheet builds the sheet of the file at path as calcdoc build does:
// stamped by Of, source embedded.
func builtSheet(t *testing.T, path string) string {
	t.Helper()
	src, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	doc := calcdoc.Parse(path, src, kind.Standard())
	st := Of(path, src)
	page, err := render.Sheet(doc, render.Options{Version: "test", Stamp: &st, EmbedSource: true})
	if err != nil {
		t.Fatal(err)
	}
	return string(page)
}

func writeFile(t *testing.T, path, text string) { t.Helper(); sheettest.WriteFile(t, path, text) }

// The stamp of a built sheet in a temporary git repository: a committed
// file gives its commit and hash and no marker; a modified file the marker
// and the new hash; an untracked file the marker; a file outside any
// repository says so.
func TestSheetStampInGit(t *testing.T) {
	stampGitEnv(t)
	repo := t.TempDir()
	// beside the repository, under the same ceiling
	loose := filepath.Join(t.TempDir(), "loose.md")
	stampGit(t, repo, "-c", "init.defaultBranch=main", "init", "-q")
	stampGit(t, repo, "config", "user.name", "Stamp Test")
	stampGit(t, repo, "config", "user.email", "stamp-test@example.invalid")
	stampGit(t, repo, "config", "commit.gpgsign", "false")
	committed := filepath.Join(repo, "calc", "heater.md")
	writeFile(t, committed, stampDoc)
	stampGit(t, repo, "add", "calc/heater.md")
	stampGit(t, repo, "commit", "-q", "-m", "heater calculation")
	head := stampGit(t, repo, "rev-parse", "HEAD")
	fileCommit := stampGit(t, repo, "log", "-1", "--format=%H", "--", "calc/heater.md")

	t.Run("committed", func(t *testing.T) {
		page := builtSheet(t, committed)
		sum := coreutilsSHA256(t, committed)
		for _, want := range []string{
			`data-sha256="` + sum + `"`,
			`data-commit="` + head + `"`,
			`data-commit="` + fileCommit + `"`,
			`data-state="clean"`,
			"<code>" + head + "</code>",
			`<code class="hash">` + sum + `</code>`,
			"clean: the file is as committed",
			// the page footer carries the hash shortened to 12 digits
			`"source sha256 ` + sum[:12] + `"`,
		} {
			if !strings.Contains(page, want) {
				t.Errorf("the sheet lacks %s", want)
			}
		}
		if strings.Contains(page, `class="marker"`) || strings.Contains(page, "NOT FOR ISSUE") {
			t.Errorf("a committed, satisfied sheet carries the marker")
		}
	})

	t.Run("modified", func(t *testing.T) {
		before := coreutilsSHA256(t, committed)
		writeFile(t, committed, strings.Replace(stampDoc, "R = 26.45 ohm", "R = 27.0 ohm", 1))
		defer writeFile(t, committed, stampDoc)
		page := builtSheet(t, committed)
		sum := coreutilsSHA256(t, committed)
		if sum == before {
			t.Fatal("the edit did not change the file's hash")
		}
		for _, want := range []string{
			`data-sha256="` + sum + `"`,
			`data-state="modified"`,
			`data-commit="` + fileCommit + `"`,
			`<div class="marker" aria-hidden="true"><span>NOT FOR ISSUE: uncommitted changes</span></div>`,
			"uncommitted changes: the file differs from the last commit",
		} {
			if !strings.Contains(page, want) {
				t.Errorf("the sheet lacks %s", want)
			}
		}
		if strings.Contains(page, before) {
			t.Errorf("the sheet still carries the committed file's hash %s", before)
		}
	})

	t.Run("untracked", func(t *testing.T) {
		p := filepath.Join(repo, "calc", "spare.md")
		writeFile(t, p, stampDoc)
		page := builtSheet(t, p)
		for _, want := range []string{
			`data-sha256="` + coreutilsSHA256(t, p) + `"`,
			`data-state="untracked"`,
			`data-commit=""`,
			`<span>NOT FOR ISSUE: uncommitted changes</span>`,
			"uncommitted changes: the file is not committed",
			"Last commit of the file</th><td>none recorded",
		} {
			if !strings.Contains(page, want) {
				t.Errorf("the sheet lacks %s", want)
			}
		}
	})

	t.Run("no repository", func(t *testing.T) {
		p := loose
		writeFile(t, p, stampDoc)
		page := builtSheet(t, p)
		for _, want := range []string{
			`data-sha256="` + coreutilsSHA256(t, p) + `"`,
			`data-state="no-repo"`,
			"not in a git repository; no commit recorded",
			`<span>NOT FOR ISSUE: source not under version control</span>`,
		} {
			if !strings.Contains(page, want) {
				t.Errorf("the sheet lacks %s", want)
			}
		}
	})

	t.Run("committed with a failing check", func(t *testing.T) {
		p := filepath.Join(repo, "calc", "over.md")
		writeFile(t, p, strings.Replace(stampDoc, "check P <= 2.1 kW", "check P <= 1.5 kW", 1))
		stampGit(t, repo, "add", "calc/over.md")
		stampGit(t, repo, "commit", "-q", "-m", "over limit")
		page := builtSheet(t, p)
		if !strings.Contains(page, `data-state="clean"`) {
			t.Errorf("the committed file is not clean")
		}
		if !strings.Contains(page, "<span>NOT FOR ISSUE: a check is not satisfied</span>") {
			t.Errorf("a sheet whose check fails lacks the marker")
		}
	})
}

// The hash on the sheet is the file's SHA-256 as GNU coreutils'
// sha256sum prints it, for text and for bytes that are not UTF-8 (carried
// as base64).
func TestSheetHashMatchesSha256sum(t *testing.T) {
	dir := t.TempDir()
	cases := []struct {
		name string
		src  string
	}{
		{"utf-8 text", stampDoc},
		{"not utf-8", strings.Replace(stampDoc, "heater circuit", "heater \xff\xfe circuit", 1)},
		{"crlf line ends", strings.ReplaceAll(stampDoc, "\n", "\r\n")},
		{"empty", ""},
	}
	for i, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			p := filepath.Join(dir, "doc"+string(rune('a'+i))+".md")
			writeFile(t, p, c.src)
			page := builtSheet(t, p)
			sum := coreutilsSHA256(t, p)
			if !strings.Contains(page, `<section class="stamp" data-sha256="`+sum+`"`) {
				t.Errorf("the stamp does not carry sha256sum's %s", sum)
			}
			if !strings.Contains(page, `data-sha256="`+sum+`">`) {
				t.Errorf("the embedded source does not carry sha256sum's %s", sum)
			}
		})
	}
}
