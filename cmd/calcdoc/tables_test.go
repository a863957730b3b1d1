package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// Through the command, outside any git repository: a document in a
// folder named on the command line reads a CSV file inside that folder;
// a file beside the folder (leading out of it) is refused at the path's
// line and column; the built sheet verifies from itself with the CSV file
// deleted. The value is a row of IEC 60228:2004, Table 2 (4 mm²: 4.61
// Ω/km).
func TestTablesThroughTheCommand(t *testing.T) {
	top := t.TempDir()
	t.Setenv("GIT_CEILING_DIRECTORIES", filepath.Dir(top))
	dir := filepath.Join(top, "calcs")
	write(t, dir, "data/cu.csv", "S [mm²],R_20 [Ω/km]\n2.5,7.41\n4,4.61\n")
	write(t, top, "outside.csv", "S [mm²],R_20 [Ω/km]\n2.5,7.41\n4,4.61\n")
	write(t, dir, "sub/feeder.md", "```table cu from ../data/cu.csv\nsource: IEC 60228:2004, Table 2\n```\n```calc\nR = cu.R_20(4 mm²)\ncheck R < 5 Ω/km\n```\n")
	out := filepath.Join(top, "out")
	if st, so, se := runCLI("build", "-o", out, dir); st != 0 {
		t.Fatalf("build: status %d\n%s%s", st, so, se)
	}
	sheet := filepath.Join(out, "sub", "feeder.html")
	page, err := os.ReadFile(sheet)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(page), "cu: S = 4 mm² → R_20 = 4.61 Ω/km (row 2)") || !strings.Contains(string(page), `data-file="../data/cu.csv"`) {
		t.Errorf("the sheet does not show the look-up and the file it read")
	}
	if err := os.Remove(filepath.Join(dir, "data", "cu.csv")); err != nil {
		t.Fatal(err)
	}
	if st, so, se := runCLI("verify", sheet); st != 0 {
		t.Errorf("verify with the CSV file deleted: status %d\n%s%s", st, so, se)
	}

	// the same document reading the file beside the folder given
	doc := write(t, dir, "sub/out.md", "```table cu from ../../outside.csv\nsource: x\n```\n")
	st, so, _ := runCLI("check", dir)
	if st == 0 || !strings.Contains(so, doc+":1:18: ../../outside.csv leads out of") {
		t.Errorf("a path out of the folder given: status %d\n%s", st, so)
	}
}
