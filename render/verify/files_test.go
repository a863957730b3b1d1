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
	st.Files = stamp.Files(doc.Files)
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
