package verify

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
	"calcdoc/render"
	"calcdoc/render/stamp"
)

// A sheet that read a CSV file carries it: verify evaluates the sheet
// from the sheet alone, with the CSV file deleted after the build, and a
// change to the carried bytes is found. The value checked is a row of
// IEC 60228:2004, Table 2 (4 mm² class 2 copper: 4.61 Ω/km).
func TestVerifySheetThatReadACSVFile(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "doc.md")
	csv := filepath.Join(dir, "data", "cu.csv")
	src := "---\ntitle: t\n---\n```table cu from data/cu.csv\nsource: IEC 60228:2004, Table 2\n```\n```calc\nR = cu.R_20(4 mm²)\n```\n"
	if err := os.MkdirAll(filepath.Dir(csv), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(csv, []byte("S [mm²],R_20 [Ω/km]\n2.5,7.41\n4,4.61\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	doc, err := calcdoc.LoadWith(path, kind.Standard(), calcdoc.Inputs{Root: dir})
	if err != nil || len(doc.Errors) > 0 {
		t.Fatalf("load: %v %v", err, doc.Errors)
	}
	st := verifyStamp([]byte(src))
	st.Files = stamp.Files(doc.DataFiles)
	page, err := render.Sheet(doc, render.Options{Version: "test", Stamp: st, EmbedSource: true})
	if err != nil {
		t.Fatal(err)
	}
	if err := os.Remove(csv); err != nil {
		t.Fatal(err)
	}
	rep, err := Verify(page, "test")
	if err != nil {
		t.Fatal(err)
	}
	if !rep.OK() {
		t.Fatalf("a sheet that read a CSV file does not verify from itself: %v", rep.Sheets[0].Differences)
	}
	if !strings.Contains(string(page), "cu: S = 4 mm² → R_20 = 4.61 Ω/km (row 2)") {
		t.Errorf("the look-up row is missing")
	}
	// the carried CSV changed (4.61 → 4.71), its stated hash kept
	forged := strings.Replace(string(page), "4,4.61\n</pre>", "4,4.71\n</pre>", 1)
	if forged == string(page) {
		t.Fatal("the carried file was not found in the sheet")
	}
	rep, err = Verify([]byte(forged), "test")
	if err != nil {
		t.Fatal(err)
	}
	if rep.OK() {
		t.Fatal("a changed carried CSV file verifies")
	}
	found := false
	for _, d := range rep.Sheets[0].Differences {
		if d.Kind == "hash" && strings.Contains(d.Message, "data file data/cu.csv") {
			found = true
		}
	}
	if !found {
		t.Errorf("the changed carried file is not named: %v", rep.Sheets[0].Differences)
	}
}

// A sheet that read a CSV file with uncommitted changes, relabelled as if
// the file were clean, renders consistently from its record; held against
// git (verify --git), the file at its recorded commit is not the carried
// file, and verify names the data file. The genuine sheet passes.
func TestVerifyDataFileStateRelabelled(t *testing.T) {
	dir := t.TempDir()
	git(t, dir, "init", "-q")
	path := filepath.Join(dir, "doc.md")
	csv := filepath.Join(dir, "data", "cu.csv")
	src := "```table cu from data/cu.csv\nsource: IEC 60228:2004, Table 2\n```\n```calc\nR = cu.R_20(4 mm²)\n```\n"
	if err := os.MkdirAll(filepath.Dir(csv), 0o755); err != nil {
		t.Fatal(err)
	}
	for p, b := range map[string]string{path: src, csv: "S [mm²],R_20 [Ω/km]\n2.5,7.41\n4,4.61\n"} {
		if err := os.WriteFile(p, []byte(b), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	git(t, dir, "add", "doc.md", "data/cu.csv")
	git(t, dir, "commit", "-q", "-m", "doc and data")
	if err := os.WriteFile(csv, []byte("S [mm²],R_20 [Ω/km]\n2.5,7.41\n4,4.62\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	doc, err := calcdoc.LoadWith(path, kind.Standard(), calcdoc.Inputs{})
	if err != nil || len(doc.Errors) > 0 {
		t.Fatalf("load: %v %v", err, doc.Errors)
	}
	st := stamp.Of(path, doc.Source)
	st.Files = stamp.Files(doc.DataFiles)
	if st.State != stamp.Clean || st.Files[0].State != stamp.Modified {
		t.Fatalf("stamp %+v", st)
	}
	build := func(st render.StampInfo) []byte {
		p, err := render.Sheet(doc, render.Options{Version: "test", Stamp: &st, EmbedSource: true})
		if err != nil {
			t.Fatal(err)
		}
		return p
	}
	opt := Options{Version: "test", Git: true}
	rep, err := Check(build(st), opt)
	if err != nil || !rep.OK() {
		t.Fatalf("the genuine sheet: %v %+v", err, rep.Sheets[0].Differences)
	}
	lie := st
	lie.Files = append([]render.FileStamp(nil), st.Files...)
	lie.Files[0].State = stamp.Clean
	lie.Files[0].Detail = "the file is as committed"
	forged := build(lie)
	if strings.Contains(string(forged), "NOT FOR ISSUE") {
		t.Fatal("the relabelled sheet still carries a marker")
	}
	rep, err = Check(forged, opt)
	if err != nil {
		t.Fatal(err)
	}
	found := false
	for _, d := range rep.Sheets[0].Differences {
		if d.Kind == "git" && strings.Contains(d.Message, "data file data/cu.csv: the sheet says the source is clean") {
			found = true
		}
	}
	if rep.OK() || !found {
		t.Errorf("the relabelled data file is not found: %+v", rep.Sheets[0].Differences)
	}
}

// A sheet whose table could not read its CSV file carries the error, so
// it verifies as it was built though the file has appeared since.
func TestVerifySheetWithAMissingCSVFile(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "doc.md")
	src := "```table cu from data/cu.csv\nsource: IEC 60228:2004, Table 2\n```\n"
	if err := os.WriteFile(path, []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	doc, err := calcdoc.LoadWith(path, kind.Standard(), calcdoc.Inputs{Root: dir})
	if err != nil || len(doc.Errors) != 1 || !strings.Contains(doc.Errors[0].Msg, "no such file") {
		t.Fatalf("load: %v %v", err, doc.Errors)
	}
	page, err := render.Sheet(doc, render.Options{Version: "test", Stamp: verifyStamp([]byte(src)), EmbedSource: true})
	if err != nil {
		t.Fatal(err)
	}
	if err := os.MkdirAll(filepath.Join(dir, "data"), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, "data", "cu.csv"), []byte("S [mm²],R_20 [Ω/km]\n4,4.61\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	rep, err := Verify(page, "test")
	if err != nil {
		t.Fatal(err)
	}
	if !rep.OK() {
		t.Errorf("the sheet with a missing CSV file does not verify: %v", rep.Sheets[0].Differences)
	}
}
