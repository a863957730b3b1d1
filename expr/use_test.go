package expr

import (
	"strings"
	"testing"
)

// TestParseUse reads two use lines placed at line 11 and their positions,
// counted by hand: in "use I_k3, Z_Q as Z_src from ../fault/msb board.md"
// the new name Z_src starts at column 18 and the path at column 29 (4
// characters of "use ", 6 of "I_k3, ", 4 of "Z_Q ", 3 of "as ", 6 of
// "Z_src ", 5 of "from "); the indented case line's use starts at column 3.
func TestParseUse(t *testing.T) {
	src := NewSource("x = 1\nuse I_k3, Z_Q as Z_src from ../fault/msb board.md # the board\n  use φ in max as phi_max from a.md\ny = x", PlaceAt("x = 1\nuse I_k3, Z_Q as Z_src from ../fault/msb board.md # the board\n  use φ in max as phi_max from a.md\ny = x", 10, 1))
	var errs ErrorList
	stmts := ParseBlock(src, CalcMode, &errs)
	if len(errs) > 0 {
		t.Fatalf("errors: %v", errs)
	}
	if len(stmts) != 4 {
		t.Fatalf("%d statements, want 4 (in order)", len(stmts))
	}
	u, ok := stmts[1].(*Use)
	if !ok {
		t.Fatalf("statement 2 is %T", stmts[1])
	}
	if u.Path != "../fault/msb board.md" || u.Desc() != "the board" || len(u.Names) != 2 {
		t.Errorf("use = %+v", u)
	}
	if u.Names[0].Name.Name != "I_k3" || u.Names[0].As != nil || u.Names[1].Name.Name != "Z_Q" || u.Names[1].Local().Name != "Z_src" {
		t.Errorf("names = %+v %+v", u.Names[0], u.Names[1])
	}
	if u.Pos().String() != "11:1" || u.PathPos.String() != "11:29" || u.Names[1].As.Pos().String() != "11:18" {
		t.Errorf("positions: use %s, path %s, as %s", u.Pos(), u.PathPos, u.Names[1].As.Pos())
	}
	c := stmts[2].(*Use)
	if c.Names[0].Case == nil || c.Names[0].Case.Name != "max" || c.Names[0].Local().Name != "phi_max" || c.Pos().String() != "12:3" {
		t.Errorf("case use = %+v", c.Names[0])
	}
	if _, ok := stmts[3].(*Assign); !ok {
		t.Errorf("statement 4 is %T", stmts[3])
	}
}

// TestParseUseErrors: each malformed use line is one bad statement with its
// error at the column counted by hand (the word or gap at fault).
func TestParseUseErrors(t *testing.T) {
	for _, c := range []struct{ line, pos, want string }{
		{"use I_k3", "1:1", "names the document"},
		{"use from a.md", "1:4", "at least one value"},
		{"use a b from a.md", "1:7", "unexpected \"b\""},
		{"use a as from a.md", "1:7", "unexpected \"as\""},
		{"use 3 from a.md", "1:5", "expected the name of a value"},
		{"use a, from a.md", "1:4", "at least one value"},
	} {
		var errs ErrorList
		stmts := ParseBlock(NewSource(c.line, Pos{}), CalcMode, &errs)
		if len(errs) == 0 || len(stmts) != 1 {
			t.Errorf("%q: %d statements, errors %v", c.line, len(stmts), errs)
			continue
		}
		if _, bad := stmts[0].(*BadStmt); !bad || errs[0].Pos.String() != c.pos || !strings.Contains(errs[0].Msg, c.want) {
			t.Errorf("%q: %T, error %v; want at %s %q", c.line, stmts[0], errs[0], c.pos, c.want)
		}
	}
}

func TestUsePath(t *testing.T) {
	for line, want := range map[string]string{
		"use a, b from ../x.md # note": "../x.md",
		"  use a as b from y.md\r":     "y.md",
		"use = 3":                      "",
		"user = 3":                     "",
	} {
		got, _ := UsePath(line)
		if got != want {
			t.Errorf("UsePath(%q) = %q, want %q", line, got, want)
		}
	}
}
