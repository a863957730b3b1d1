package stamp

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
	"calcdoc/render"
)

const filesDoc = "---\ntitle: t\n---\n```table cu from data/cu.csv\nsource: IEC 60228:2004, Table 2\n```\n```calc\nR = cu.R_20(4 mm²)\n```\n"

const filesCSV = "S [mm²],R_20 [Ω/km]\n2.5,7.41\n4,4.61\n"

// fileSheet builds the sheet of the document at path as build does
// (build.Stamped): the source and its data files stamped.
func fileSheet(t *testing.T, path string) (*calcdoc.Document, render.StampInfo, string) {
	t.Helper()
	doc, err := calcdoc.LoadWith(path, kind.Standard(), calcdoc.Inputs{})
	if err != nil {
		t.Fatal(err)
	}
	if len(doc.Errors) > 0 {
		t.Fatalf("errors: %v", doc.Errors)
	}
	st := Of(path, doc.Source)
	st.Files = Files(doc.DataFiles)
	page, err := render.Sheet(doc, render.Options{Version: "test", Stamp: &st, EmbedSource: true})
	if err != nil {
		t.Fatal(err)
	}
	return doc, st, string(page)
}

// The stamp lists each CSV file a sheet read with its SHA-256 (held
// against coreutils' sha256sum) and its last commit (held against `git
// log -1 --format=%H -- FILE`); an uncommitted change to the CSV file
// marks the sheet as a change to its source does.
func TestStampListsDataFiles(t *testing.T) {
	stampGitEnv(t)
	dir := t.TempDir()
	stampGit(t, dir, "init", "-q")
	stampGit(t, dir, "config", "user.name", "T")
	stampGit(t, dir, "config", "user.email", "t@example.invalid")
	path := filepath.Join(dir, "doc.md")
	csv := filepath.Join(dir, "data", "cu.csv")
	writeFile(t, path, filesDoc)
	writeFile(t, csv, filesCSV)
	stampGit(t, dir, "add", "doc.md", "data/cu.csv")
	stampGit(t, dir, "commit", "-q", "-m", "doc and data")

	_, st, page := fileSheet(t, path)
	if len(st.Files) != 1 {
		t.Fatalf("stamp files %+v, want one", st.Files)
	}
	f := st.Files[0]
	if f.Path != "data/cu.csv" || f.SHA256 != coreutilsSHA256(t, csv) {
		t.Errorf("file %s %s, want data/cu.csv %s (sha256sum)", f.Path, f.SHA256, coreutilsSHA256(t, csv))
	}
	if want := stampGit(t, dir, "log", "-1", "--format=%H", "--", "data/cu.csv"); f.Commit != want || f.State != Clean {
		t.Errorf("file commit %s state %v, want %s clean", f.Commit, f.State, want)
	}
	if !strings.Contains(page, `data-file="data/cu.csv"`) || strings.Contains(page, "NOT FOR ISSUE") {
		t.Errorf("clean sheet: file row missing or sheet marked")
	}

	// an uncommitted change to the CSV file alone
	if err := os.WriteFile(csv, []byte(strings.Replace(filesCSV, "4.61", "4.62", 1)), 0o644); err != nil {
		t.Fatal(err)
	}
	_, st, page = fileSheet(t, path)
	if st.State != Clean || st.Files[0].State != Modified || st.SheetState() != Modified {
		t.Errorf("source %v, file %v, sheet %v; want clean, modified, modified", st.State, st.Files[0].State, st.SheetState())
	}
	if !strings.Contains(page, "NOT FOR ISSUE: uncommitted changes") || !strings.Contains(page, "the file differs from its last commit") {
		t.Errorf("a changed CSV file does not mark the sheet as changed")
	}
	// a CSV file never committed
	stampGit(t, dir, "rm", "-q", "--cached", "data/cu.csv")
	stampGit(t, dir, "commit", "-q", "-m", "untrack")
	if _, st, _ = fileSheet(t, path); st.SheetState() != Untracked {
		t.Errorf("untracked CSV: sheet state %v, want untracked", st.SheetState())
	}
}
