package data

import (
	"strings"
	"testing"

	"calcdoc/expr"
)

// block parses text as the body of a table block whose first line is line
// 10 of the document.
func block(text string, fromFile bool) (*Table, expr.ErrorList) {
	return ParseBlock("cu", expr.NewSource(text, expr.PlaceAt(text, 10, 1)), fromFile)
}

// The example of LANGUAGE.md section 9 (values of IEC 60228:2004, Table 2,
// plain annealed copper, class 2, as the contract quotes them).
const contractExample = `# Plain (not metal-coated) annealed copper, class 2: maximum DC resistance at 20 °C
source: IEC 60228:2004, Table 2
S [mm²] | R_20 [Ω/km]
1.5     | 12.1
2.5     | 7.41
4       | 4.61`

func TestParseBlock(t *testing.T) {
	tab, errs := block(contractExample, false)
	if len(errs) > 0 {
		t.Fatal(errs)
	}
	if tab.Source != "IEC 60228:2004, Table 2" || len(tab.Notes) != 1 || !strings.HasPrefix(tab.Notes[0], "Plain") {
		t.Errorf("source %q, notes %q", tab.Source, tab.Notes)
	}
	if len(tab.Cols) != 2 || tab.Cols[0].Header() != "S [mm²]" || tab.Cols[1].Header() != "R_20 [Ω/km]" {
		t.Fatalf("columns %+v", tab.Cols)
	}
	if len(tab.Rows) != 3 || tab.Rows[1].Line != 14 {
		t.Fatalf("rows %+v", tab.Rows)
	}
	// 7.41 Ω/km is 7.41e-3 Ω/m and 2.5 mm² is 2.5e-6 m² in coherent units
	if v := tab.Rows[1].Cells[1].V; v < 7.41e-3*(1-1e-12) || v > 7.41e-3*(1+1e-12) {
		t.Errorf("R_20 of 2.5 mm² = %v Ω/m", v)
	}
	if k := tab.Key(1); k.Dim != expr.DimArea || real(k.Z) < 2.5e-6*(1-1e-12) || real(k.Z) > 2.5e-6*(1+1e-12) {
		t.Errorf("key %v %v", k.Z, k.Dim)
	}
}

func TestParseBlockGapsAndPlainColumns(t *testing.T) {
	tab, errs := block("source: invented for the test\nn | x [%] | y\n1 | 5 | \n2 |   | 7\n3 | 1e1 | -2.5", false)
	if len(errs) > 0 {
		t.Fatal(errs)
	}
	if !tab.Rows[0].Cells[2].Gap || !tab.Rows[1].Cells[1].Gap || tab.Rows[2].Cells[2].V != -2.5 {
		t.Errorf("rows %+v", tab.Rows)
	}
	if tab.Cols[0].Unit != nil || tab.Cols[1].Unit.Text != "%" || tab.Rows[2].Cells[1].V != 0.1 {
		t.Errorf("columns %+v, 1e1 %% = %v", tab.Cols, tab.Rows[2].Cells[1].V)
	}
}

// Every problem is reported at its line and column in the document, with
// the fix.
func TestParseBlockErrors(t *testing.T) {
	for _, c := range []struct {
		text     string
		fromFile bool
		at, want string
	}{
		{"S [mm²] | R [Ω/km]\n1.5 | 12.1", false, "10:1", "has no source: line"},
		{"source:\nS [mm²] | R [Ω/km]\n1.5 | 12.1", false, "10:1", "names no source"},
		{"source: a\nsource: b\nS | R\n1 | 2", false, "11:1", "a second source: line"},
		{"source: a", false, "10:1", "has no header row"},
		{"source: a\nS [mm²] | R [Ω/km]", false, "10:1", "no rows of data"},
		{"source: a\nS [mm²] | R [Ω/km]\n1.5 | 12,1", false, "12:7", `write the decimal point as "." (12.1)`},
		{"source: a\nS [mm²] | R [Ω/km]\n1.5 | 12.1 Ω", false, "12:7", "with no unit (the header gives it)"},
		{"source: a\nS [mm²] | R [Ω/km]\n1.5 | NaN", false, "12:7", "is not a number"},
		{"source: a\nS [mm²] | R [Ω/km]\n | 12.1", false, "12:2", "the key S of this row is empty"},
		{"source: a\nS [mm²] | R [Ω/km]\n2.5 | 7.41\n1.5 | 12.1", false, "13:1", "the key 1.5 mm² is below the key 2.5 mm² of the row above (line 12): keys rise strictly"},
		{"source: a\nS [mm²] | R [Ω/km]\n2.5 | 7.41\n2.5 | 7.41", false, "13:1", "repeats the key"},
		{"source: a\nS [mm²] | R [Ω/km]\n2.5 | 7.41 | 3", false, "12:1", "this row has 3 cells, the header 2"},
		{"source: a\nS [mm²] | R [Ohm/km]\n2.5 | 7.41", false, "11:11", "the unit of R: unknown unit \"Ohm\""},
		{"source: a\nS [mm²] | 2R [Ω/km]\n2.5 | 7.41", false, "11:11", "the column name"},
		{"source: a\nS [mm²] | S [Ω/km]\n2.5 | 7.41", false, "11:11", "the column S is named twice"},
		{"source: a\nS [mm²] |\n2.5 | 7.41", false, "11:10", "a header cell is empty"},
		{"source: a\nS [mm²] | R []\n2.5 | 7.41", false, "11:11", "hold no unit"},
		{"source: a\nS | R\n--|--\n1 | 2", false, "12:1", "a row of dashes is not needed"},
		{"# note\nsource: a\nS | R", true, "12:1", "the rows of the table cu come from its file"},
	} {
		_, errs := block(c.text, c.fromFile)
		if len(errs) == 0 {
			t.Errorf("%q: no error, want %q", c.text, c.want)
			continue
		}
		if got := errs[0].Pos.String(); got != c.at || !strings.Contains(errs[0].Msg, c.want) {
			t.Errorf("%q: %v, want at %s: ...%s...", c.text, errs[0], c.at, c.want)
		}
	}
}

func TestParseBlockFromFile(t *testing.T) {
	hdr, errs := block("# Aluminium too\nsource: IEC 60228:2004, Table 2", true)
	if len(errs) > 0 {
		t.Fatal(errs)
	}
	tab, err := FromFile(hdr, "data/r20.csv", []byte("S [mm²],R_cu [Ω/km],R_al [Ω/km]\n1.5,12.1,\n10,1.83,3.08\n"))
	if err != nil {
		t.Fatal(err)
	}
	if tab.Name != "cu" || tab.Source != "IEC 60228:2004, Table 2" || tab.Path != "data/r20.csv" || len(tab.Rows) != 2 || !tab.Rows[0].Cells[2].Gap {
		t.Errorf("%+v", tab)
	}
	// the SHA-256 of the file's bytes, as Python's hashlib.sha256 gives it
	// for the same UTF-8 text (computed outside the project)
	if want := "50e3b56c7c29791e7c5a3ee54ebd9462fa64d3148a0d0a842c8f9dcbd8246850"; tab.SHA256 != want {
		t.Errorf("SHA256 %q, want %q", tab.SHA256, want)
	}
}

func TestParseCSVErrors(t *testing.T) {
	for _, c := range []struct{ text, want string }{
		{"", "d.csv: the file is empty"},
		{"S [mm²],R [Ω/km]\n", "d.csv: the file has a header row and no rows of data"},
		{"# notes\nS,R\n1,2", "d.csv:1: column 1: a CSV file holds no notes"},
		{"S [mm²],R [Ω/km]\n1.5,12.1\n2.5,x", `d.csv:3: column 2: "x" in column R is not a number`},
		{"S [mm²],R [Ω/km]\n1.5,12.1\n1.5,12.1", "d.csv:3: column 1: the key 1.5 mm² repeats the key 1.5 mm² of the row above (line 2)"},
		{"S [mm²],R [Ω/km]\n1.5,12.1,3", "d.csv:2: this row has 3 fields, the header row 2"},
		{"S [mm²],R [Ω/km]\n1.5,\"12.1", "d.csv:2: extraneous or missing \" in quoted-field"},
		{"S [mm²],R [Ωkm]\n1.5,12.1", `d.csv:1: column 2: the unit of R: unknown unit "Ωkm"`},
		{"S [mm²],R\xff\n1.5,12.1", "d.csv: the file is not UTF-8 text"},
	} {
		_, err := ParseCSV("d.csv", []byte(c.text))
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%q: error %v, want %q", c.text, err, c.want)
		}
	}
	// a byte-order mark and CRLF line ends, as a spreadsheet saves them
	tab, err := ParseCSV("d.csv", []byte("\ufeffS [mm²],R [Ω/km]\r\n1.5,12.1\r\n2.5, 7.41\r\n"))
	if err != nil || len(tab.Rows) != 2 || tab.Cols[0].Name != "S" || tab.Rows[1].Line != 3 {
		t.Errorf("%v %+v", err, tab)
	}
}
