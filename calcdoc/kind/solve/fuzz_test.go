package solve

import (
	"strings"
	"testing"
	"unicode/utf8"

	"calcdoc/expr"
)

// FuzzSolveHeader feeds arbitrary info strings to ParseSolveHeader. It
// must never panic; every error must lie on the header's line, within the
// text or just after it; every unknown read must be a name written at its
// position, listed once; and an info string read without errors must read
// back the same when written out again from its unknowns. The committed
// corpus is in testdata/fuzz/FuzzSolveHeader.
func FuzzSolveHeader(f *testing.F) {
	for _, s := range []string{
		"I_a[A], I_b[A]",
		"R_x[Ω] real near 10 Ω, V_2[V] near 230 V",
		"x real near polar(1, 30°)",
		"a,,b",
		"",
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, arg string) {
		if !utf8.ValidString(arg) || strings.ContainsAny(arg, "\n\r") {
			return // an info string is one line of valid UTF-8 (calcdoc.Parse replaces invalid bytes)
		}
		pos := expr.PlaceAt(arg, 3, 10)
		n := utf8.RuneCountInString(arg)
		us, errs := ParseSolveHeader(arg, pos)
		for _, e := range errs {
			if e.Pos.Line() != pos.Line() || e.Pos.Col() < pos.Col() || e.Pos.Col() > pos.Col()+n {
				t.Errorf("error at %v outside the header (col %d to %d): %s", e.Pos, pos.Col(), pos.Col()+n, e.Msg)
			}
			if e.Msg == "" {
				t.Error("an error without a message")
			}
		}
		rs := []rune(arg)
		seen := map[string]bool{}
		for _, u := range us {
			if seen[u.Name] {
				t.Errorf("%s listed twice", u.Name)
			}
			seen[u.Name] = true
			off := u.Pos.Col() - pos.Col()
			if u.Pos.Line() != pos.Line() || off < 0 || off+utf8.RuneCountInString(u.Name) > len(rs) || string(rs[off:off+utf8.RuneCountInString(u.Name)]) != u.Name {
				t.Errorf("unknown %q is not written at %v", u.Name, u.Pos)
			}
			for i, r := range u.Name {
				if i == 0 && !isNameStart(r) || !isNameRune(r) {
					t.Errorf("unknown %q is not a name", u.Name)
					break
				}
			}
		}
		if len(errs) > 0 {
			return
		}
		// write the unknowns out again and read them back
		var parts []string
		for _, u := range us {
			p := u.Name
			if u.Display != nil {
				p += "[" + u.Display.Text + "]"
			}
			if u.Real {
				p += " real"
			}
			if u.NearText != "" {
				p += " near " + u.NearText
			}
			parts = append(parts, p)
		}
		again, errs2 := ParseSolveHeader(strings.Join(parts, ", "), pos)
		if len(errs2) > 0 || len(again) != len(us) {
			t.Fatalf("written out as %q, it reads back with errors %v", strings.Join(parts, ", "), errs2)
		}
		for i, u := range us {
			v := again[i]
			if v.Name != u.Name || v.Real != u.Real || v.NearText != u.NearText || (v.Display == nil) != (u.Display == nil) ||
				u.Display != nil && v.Display.Text != u.Display.Text {
				t.Errorf("unknown %d reads back as %+v, was %+v", i, v, u)
			}
		}
	})
}
