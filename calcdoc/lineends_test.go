package calcdoc_test

import (
	"calcdoc/calcdoc"
	"strings"
	"testing"

	"calcdoc/expr"
)

// TestReaderLineEnds: a UTF-8 byte-order mark before the front matter and
// the three line ends an editor shows as a new line (LF, CR LF, and a lone
// CR, the old Mac convention) all leave the front matter read and every
// error at the line and column a reader counts. Expected positions are
// counted by hand in the source below: line 1 "---", 2 "digits: 3",
// 3 "phasors: peak", 4 "---", 5 blank, 6 "```calc", 7 "x = 1 V",
// 8 "y = x + 2 A" (the "+" is the 7th character), 9 "```"; the BOM is not
// a character a reader sees, so it moves no column.
func TestReaderLineEnds(t *testing.T) {
	lines := []string{"---", "digits: 3", "phasors: peak", "---", "", "```calc", "x = 1 V", "y = x + 2 A", "```", ""}
	cases := []struct {
		name string
		src  string
	}{
		{"LF", strings.Join(lines, "\n")},
		{"CR LF", strings.Join(lines, "\r\n")},
		{"lone CR", strings.Join(lines, "\r")},
		{"BOM and LF", "\uFEFF" + strings.Join(lines, "\n")},
		{"BOM and CR LF", "\uFEFF" + strings.Join(lines, "\r\n")},
		{"BOM and lone CR", "\uFEFF" + strings.Join(lines, "\r")},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			d := calcdoc.Parse("le.md", []byte(c.src), kinds)
			if d.Front.Digits != 3 || d.Front.Phasors != "peak" {
				t.Errorf("front matter not read: %+v", d.Front)
			}
			if len(d.Blocks) != 1 || d.Blocks[0].Kind != "calc" {
				t.Fatalf("want one calc block, got %d blocks", len(d.Blocks))
			}
			if len(d.Errors) != 1 {
				t.Fatalf("errors %v, want one", d.Errors)
			}
			if e := d.Errors[0]; e.Pos.Position().InFile() != (expr.Position{Line: 8, Col: 7}) || !strings.Contains(e.Msg, "cannot add") {
				t.Errorf("error at %v: %s; want le.md:8:7, cannot add", e.Pos, e.Msg)
			}
			if len(d.Values) != 1 || d.Values[0].Name != "x" || d.Values[0].Pos.Position().InFile() != (expr.Position{Line: 7, Col: 1}) {
				t.Errorf("values %+v, want x at 7:1", d.Values)
			}
		})
	}
}

// TestBOMFirstLinePositions: on the first line after a BOM (a document
// with no front matter), columns count from the first visible character
// (hand count below).
func TestBOMFirstLinePositions(t *testing.T) {
	d := calcdoc.Parse("b.md", []byte("\uFEFFSee `=1 V + 2 A` here.\n"), kinds)
	if len(d.Errors) != 1 {
		t.Fatalf("errors %v, want one", d.Errors)
	}
	// "See `=" is 6 characters, so the expression starts at column 7 and
	// its "+" ("1 V + ...") is 4 characters on, at column 11.
	if e := d.Errors[0]; e.Pos.Position().InFile() != (expr.Position{Line: 1, Col: 11}) {
		t.Errorf("error at %v: %s; want 1:11", e.Pos, e.Msg)
	}
}
