package table_test

import (
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind"
	"calcdoc/expr"
	"calcdoc/render"
)

// cuBlock holds rows of IEC 60228:2004, Table 2 (class 2 plain copper,
// maximum resistance at 20 °C), as LANGUAGE.md section 9 quotes them.
const cuBlock = "```table cu\n# class 2 copper\nsource: IEC 60228:2004, Table 2\nS [mm²] | R_20 [Ω/km]\n1.5 | 12.1\n2.5 | 7.41\n4 | 4.61\n```\n"

func parse(t *testing.T, src string) *calcdoc.Document {
	t.Helper()
	return calcdoc.Parse("doc.md", []byte(src), kind.Standard())
}

func value(t *testing.T, doc *calcdoc.Document, name string) *expr.Scalar {
	t.Helper()
	b := doc.Env.Lookup(name)
	if b == nil {
		t.Fatalf("%s not defined; errors %v", name, doc.Errors)
	}
	s, ok := b.Value.(*expr.Scalar)
	if !ok {
		t.Fatalf("%s is %T", name, b.Value)
	}
	return s
}

func near(a, b float64) bool { return math.Abs(a-b) <= 1e-9*math.Abs(b) }

// Every look-up through a document, against the rows of the table (the
// values of IEC 60228:2004, Table 2) and a hand derivation of the
// interpolation.
func TestLookupsInADocument(t *testing.T) {
	doc := parse(t, cuBlock+"```calc\nR = cu.R_20(2.5 mm²)\nR_i = interp(cu.R_20, 2 mm²)\nS_u = up(cu, 2 mm²)\nS_d = down(cu, 2 mm²)\nS_x = up(cu, 2.5 mm² * (1 + 1e-12))\n```\n")
	if len(doc.Errors) > 0 {
		t.Fatalf("errors: %v", doc.Errors)
	}
	// 7.41 Ω/km = 7.41e-3 Ω/m
	if v := real(value(t, doc, "R").Z); !near(v, 7.41e-3) {
		t.Errorf("R = %g Ω/m, want 7.41e-3", v)
	}
	// hand derivation: halfway between 1.5 and 2.5 mm²: (12.1 + 7.41)/2 = 9.755 Ω/km
	if v := real(value(t, doc, "R_i").Z); !near(v, 9.755e-3) {
		t.Errorf("R_i = %g Ω/m, want 9.755e-3", v)
	}
	if v := real(value(t, doc, "S_u").Z); !near(v, 2.5e-6) {
		t.Errorf("up = %g m², want 2.5e-6", v)
	}
	if v := real(value(t, doc, "S_d").Z); !near(v, 1.5e-6) {
		t.Errorf("down = %g m², want 1.5e-6", v)
	}
	// within 1e-9 relative of a key counts as that key (LANGUAGE.md 9)
	if v := real(value(t, doc, "S_x").Z); !near(v, 2.5e-6) {
		t.Errorf("up of 2.5 mm²·(1+1e-12) = %g m², want 2.5e-6", v)
	}
	html, err := render.Sheet(doc, render.Options{Version: "test"})
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{
		"cu: S = 2.5 mm² → R_20 = 7.41 Ω/km (row 2)",
		"between rows 1 (S = 1.5 mm², R_20 = 12.1 Ω/km) and 2 (S = 2.5 mm², R_20 = 7.41 Ω/km)",
		"cu: the first S at or above 2.000 mm² → S = 2.5 mm² (row 2)",
		"cu: the first S at or below 2.000 mm² → S = 1.5 mm² (row 1)",
		"Source: IEC 60228:2004, Table 2<br>Note: class 2 copper</p>",
	} {
		if !strings.Contains(string(html), want) {
			t.Errorf("the sheet does not show %q", want)
		}
	}
}

// Each look-up's error, and each error of a table block, at its
// file:line:col with the fix.
func TestLookupErrorsInADocument(t *testing.T) {
	// line 10 is the calc block's first line
	cases := []struct{ line, want string }{
		{"x = cu.R_20(3 mm²)", "10:5: cu.R_20(3 mm²): no row of cu has the key S = 3 mm²: the nearest keys are 2.5 mm² and 4 mm²"},
		{"x = interp(cu.R_20, 5 mm²)", "10:5"},
		{"x = up(cu, 5 mm²)", "10:5"},
		{"x = down(cu, 1 mm²)", "10:5"},
		{"x = cu.R_20(2.5 A)", "10:5"},
		{"x = cu.R_99(2.5 mm²)", "has no column R_99"},
		{"x = al.R_20(2.5 mm²)", "unknown table"},
		{"x = cu + 1", "is a table"},
	}
	for _, c := range cases {
		doc := parse(t, cuBlock+"```calc\n"+c.line+"\n```\n")
		if len(doc.Errors) == 0 {
			t.Errorf("%q: no error", c.line)
			continue
		}
		e := doc.Errors[0]
		got := e.Error()
		if e.Pos.Line() != 10 || !strings.Contains(got, c.want) {
			t.Errorf("%q: error %q, want at line 10 containing %q", c.line, got, c.want)
		}
	}
}

func TestTableBlockErrors(t *testing.T) {
	cases := []struct{ src, want string }{
		{"```table\nsource: x\nS [mm²] | R [Ω]\n1 | 2\n```\n", "1:4: a table block needs a name"}, // no name
		{"```table 2cu\nsource: x\nS [mm²] | R [Ω]\n1 | 2\n```\n", "1:10: \"2cu\" is not a name"}, // bad name
		{"```table cu at x.csv\nsource: x\n```\n", "not \"at x.csv\""},                            // a word other than from
		{"```table cu\nS [mm²] | R [Ω]\n1 | 2\n```\n", "has no source: line"},                     // no source
		{"```table cu\nsource: x\nS [mm²] | R [Ω]\n2 | 2\n1 | 3\n```\n", "5:"},                    // keys not rising
		{"```table cu from nothing.csv\nsource: x\n```\n", "1:18: nothing.csv: no such file"},     // a missing file
		{"```table cu from /etc/passwd\nsource: x\n```\n", "is an absolute path"},                 // absolute
		{cuBlock + "```table cu\nsource: y\nS [mm²] | R [Ω]\n1 | 2\n```\n", "cu"},                 // defined twice
	}
	for _, c := range cases {
		doc := parse(t, c.src)
		if len(doc.Errors) == 0 {
			t.Errorf("%q: no error", c.src)
			continue
		}
		got := doc.Errors[0].Error()
		if !strings.Contains(got, c.want) {
			t.Errorf("%q: error %q, want %q", c.src, got, c.want)
		}
	}
}

// writeRepo makes a folder with a .git folder (a repository's top, as
// FindRoot sees it), a document in sub/ and a CSV file beside it.
func writeRepo(t *testing.T, doc, csv string) (root, path string) {
	t.Helper()
	root = t.TempDir()
	must(t, os.Mkdir(filepath.Join(root, ".git"), 0o755))
	must(t, os.MkdirAll(filepath.Join(root, "sub", "data"), 0o755))
	must(t, os.WriteFile(filepath.Join(root, "sub", "data", "cu.csv"), []byte(csv), 0o644))
	path = filepath.Join(root, "sub", "doc.md")
	must(t, os.WriteFile(path, []byte(doc), 0o644))
	return root, path
}

func must(t *testing.T, err error) {
	t.Helper()
	if err != nil {
		t.Fatal(err)
	}
}

const cuCSV = "S [mm²],R_20 [Ω/km]\n1.5,12.1\n2.5,7.41\n4,4.61\n"

// A table from a CSV file: read relative to the document, recorded with
// its SHA-256 (FIPS 180-4, as sha256sum prints it), and carried.
func TestTableFromFile(t *testing.T) {
	src := "```table cu from data/cu.csv\nsource: IEC 60228:2004, Table 2\n```\n```calc\nR = cu.R_20(4 mm²)\n```\n"
	_, path := writeRepo(t, src, cuCSV)
	doc, err := calcdoc.LoadWith(path, kind.Standard(), calcdoc.Inputs{})
	must(t, err)
	if len(doc.Errors) > 0 {
		t.Fatalf("errors: %v", doc.Errors)
	}
	if v := real(value(t, doc, "R").Z); !near(v, 4.61e-3) {
		t.Errorf("R = %g, want 4.61e-3 Ω/m", v)
	}
	if len(doc.DataFiles) != 1 || doc.DataFiles[0].Path != "data/cu.csv" || doc.DataFiles[0].SHA256 != render.SourceHash([]byte(cuCSV)) {
		t.Fatalf("files recorded: %+v", doc.DataFiles)
	}
	// the same document given the bytes (as verify gives them) reads no disk
	carried := calcdoc.ParseWith(path, []byte(src), kind.Standard(), calcdoc.Inputs{Carried: map[string][]byte{"data/cu.csv": []byte(strings.Replace(cuCSV, "4.61", "4.62", 1))}})
	if v := real(value(t, carried, "R").Z); !near(v, 4.62e-3) {
		t.Errorf("carried R = %g, want 4.62e-3 Ω/m (the carried bytes, not the disk)", v)
	}
}

// A path that leads out of the repository is refused at the path's
// position, with the fix.
func TestTableFileEscapeRefused(t *testing.T) {
	root, _ := writeRepo(t, "", cuCSV)
	outside := filepath.Join(filepath.Dir(root), filepath.Base(root)+"-outside.csv")
	must(t, os.WriteFile(outside, []byte(cuCSV), 0o644))
	t.Cleanup(func() { os.Remove(outside) })
	src := "```table cu from ../../" + filepath.Base(outside) + "\nsource: x\n```\n"
	path := filepath.Join(root, "sub", "doc.md")
	must(t, os.WriteFile(path, []byte(src), 0o644))
	doc, err := calcdoc.LoadWith(path, kind.Standard(), calcdoc.Inputs{})
	must(t, err)
	if len(doc.Errors) != 1 || doc.Errors[0].Pos.Line() != 1 || doc.Errors[0].Pos.Col() != 18 || !strings.Contains(doc.Errors[0].Msg, "leads out of") || !strings.Contains(doc.Errors[0].Msg, "copy the file in") {
		t.Fatalf("errors %v, want one at 1:18 saying the path leads out of the repository", doc.Errors)
	}
}

// A CSV file's own error names the file, its line and column.
func TestTableFileBadCSV(t *testing.T) {
	src := "```table cu from data/cu.csv\nsource: x\n```\n"
	_, path := writeRepo(t, src, "S [mm²],R_20 [Ω/km]\n1.5,12.1\n1.5,7.41\n")
	doc, err := calcdoc.LoadWith(path, kind.Standard(), calcdoc.Inputs{})
	must(t, err)
	if len(doc.Errors) != 1 || !strings.Contains(doc.Errors[0].Msg, "data/cu.csv:3") {
		t.Fatalf("errors %v, want one naming data/cu.csv:3", doc.Errors)
	}
}

// A look-up that lands on a gap is an error naming the row; a long table
// (over LongRows rows) shows only the rows look-ups took, with the count.
func TestGapAndLongTable(t *testing.T) {
	var rows strings.Builder
	for i := 1; i <= 20; i++ {
		fmt.Fprintf(&rows, "%d | %d\n", i, 10*i)
	}
	src := "```table g\nsource: test data of our own\nx | y\n1 | 5\n2 |\n3 | 7\n```\n" +
		"```table long\nsource: test data of our own\nk | v\n" + rows.String() + "```\n" +
		"```calc\na = g.y(2)\nb = long.v(5)\nc = interp(long.v, 12.5)\n```\n"
	doc := parse(t, src)
	if len(doc.Errors) != 1 || doc.Errors[0].Pos.Line() != 33 || !strings.Contains(doc.Errors[0].Msg, "has a gap in column y") {
		t.Fatalf("errors %v, want the gap at line 33", doc.Errors)
	}
	// hand derivation: halfway between rows 12 (120) and 13 (130)
	if v := real(value(t, doc, "c").Z); !near(v, 125) {
		t.Errorf("c = %g, want 125", v)
	}
	html, err := render.Sheet(doc, render.Options{Version: "test"})
	if err != nil {
		t.Fatal(err)
	}
	page := string(html)
	if !strings.Contains(page, "3 of 20 rows shown") {
		t.Errorf("the long table does not say 3 of 20 rows shown")
	}
	for _, r := range []string{"<td class=\"rn\">5</td>", "<td class=\"rn\">12</td>", "<td class=\"rn\">13</td>"} {
		if !strings.Contains(page, r) {
			t.Errorf("the long table does not show %s", r)
		}
	}
	if strings.Contains(page, "<td class=\"rn\">6</td><td>6</td><td>60</td>") {
		t.Errorf("the long table shows a row no look-up took")
	}
	// a long table that no look-up used shows its size and columns only
	doc = parse(t, "```table long\nsource: test data of our own\nk | v [A]\n"+rows.String()+"```\n")
	html, err = render.Sheet(doc, render.Options{Version: "test"})
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(html), "20 rows, of columns k, v [A]; no look-up took any of them") {
		t.Errorf("an unused long table is not summed up")
	}
}
