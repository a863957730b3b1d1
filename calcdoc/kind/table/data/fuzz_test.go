package data

import (
	"strings"
	"testing"
	"unicode/utf8"

	"calcdoc/expr"
)

// FuzzTable reads arbitrary text as a table block and as a CSV file: the
// readers never panic, an error always has a position (block) or names the
// file (CSV), and a table that reads without error keeps the rule of
// LANGUAGE.md section 9 that its keys rise strictly. Every look-up of a
// table that reads is tried at each of its keys and between them.
func FuzzTable(f *testing.F) {
	for _, s := range []string{
		"source: IEC 60228:2004, Table 2\nS [mm²] | R_20 [Ω/km]\n1.5 | 12.1\n2.5 | 7.41\n4 | 4.61",
		"# a note\nsource: test\nI [A] | t [s]\n10 |\n20 | 0.1",
		"source: x\nk | v\n2 | 1\n1 | 2",
		"S [mm^2] | R [ohm/km]\n1 | 2",
		"source:\n|||\n",
		"S,R_20\n1.5,12.1\n2.5,7.41\n",
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, text string) {
		if !utf8.ValidString(text) {
			return
		}
		src := expr.NewSource(text, expr.Pos{})
		tab, errs := ParseBlock("t", src, false)
		for _, e := range errs {
			if !e.Pos.IsValid() {
				t.Fatalf("block error without a position: %v", e)
			}
		}
		if len(errs) == 0 && tab != nil {
			checkTable(t, tab)
		}
		csvTab, err := ParseCSV("f.csv", []byte(text))
		if err != nil {
			if !strings.Contains(err.Error(), "f.csv") {
				t.Fatalf("CSV error that does not name the file: %v", err)
			}
		} else if csvTab != nil {
			checkTable(t, csvTab)
		}
	})
}

func checkTable(t *testing.T, tab *Table) {
	t.Helper()
	for i := 1; i < len(tab.Rows); i++ {
		if a, b := tab.Rows[i-1].Cells[0].V, tab.Rows[i].Cells[0].V; !(a < b) {
			t.Fatalf("keys do not rise: row %d has %v after %v", i, b, a)
		}
	}
	for i := range tab.Rows {
		x := tab.Key(i)
		tab.Up(x)
		tab.Down(x)
		for j := 1; j < len(tab.Cols); j++ {
			tab.Lookup(tab.Cols[j].Name, x)
			tab.Interp(tab.Cols[j].Name, x)
		}
	}
}
