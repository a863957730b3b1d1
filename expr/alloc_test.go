package expr

import (
	"strings"
	"testing"
)

// The evaluator holds intermediate scalars inline (val.go), the parser
// allocates nodes in slabs (arena.go) and Exec reuses one buffer for
// every statement's trace. These tests check that what a statement keeps
// stays its own, and that evaluation allocates what it says.

// TestTraceKeptAcrossStatements: each statement's trace keeps the values
// its names had, after later statements recorded theirs into the reused
// buffer. Hand derivation: P = 2 V · 3 A = 6 W; Q = P + 1 W = 7 W;
// R = Q·2 = 14 W.
func TestTraceKeptAcrossStatements(t *testing.T) {
	b := runBlock("U = 2 V\nI = 3 A\nP = U * I\nQ = P + 1 W\nR = Q * 2\n")
	if errs := b.allErrors(); len(errs) > 0 {
		t.Fatal(errs)
	}
	want := [][]complex128{nil, nil, {2, 3}, {6}, {7}}
	for k, r := range b.results {
		vals := r.Trace.Values()
		if len(vals) != len(want[k]) {
			t.Fatalf("line %d: %d values in the trace, want %d", k+1, len(vals), len(want[k]))
		}
		for i, v := range vals {
			if z := v.(*Scalar).Z; z != want[k][i] {
				t.Errorf("line %d, trace value %d: %v, want %v", k+1, i, z, want[k][i])
			}
		}
	}
	if z := b.results[4].Value.(*Scalar).Z; z != 14 {
		t.Errorf("R = %v, want 14", z)
	}
}

// TestSlabListsAreTheirOwn: the argument lists of two calls come from one
// slab; appending to the first must not write over the second.
func TestSlabListsAreTheirOwn(t *testing.T) {
	var errs ErrorList
	stmts := ParseBlock(NewSource("x = max(a, b) + min(c, d)\n", Pos{}), CalcMode, &errs)
	if len(errs) > 0 || len(stmts) != 1 {
		t.Fatalf("%d statements, errors %v", len(stmts), errs)
	}
	var calls []*Call
	Walk(stmts[0].(*Assign).X, func(n Node) bool {
		if c, ok := n.(*Call); ok {
			calls = append(calls, c)
		}
		return true
	})
	if len(calls) != 2 {
		t.Fatalf("%d calls, want 2", len(calls))
	}
	if cap(calls[0].Args) != len(calls[0].Args) {
		t.Fatalf("the first call's arguments have room for %d, want exactly %d", cap(calls[0].Args), len(calls[0].Args))
	}
	_ = append(calls[0].Args, &Ident{Name: "e"})
	if id, ok := calls[1].Args[0].(*Ident); !ok || id.Name != "c" {
		t.Errorf("the second call's first argument is %s, want c", sexpr(calls[1].Args[0]))
	}
}

// TestSourceLinesInFile: the text of lines that stand one after another in
// their file is a piece of it; lines that do not (a CR LF line break, a
// line indented in a list) are joined as before. Either way the text is
// the lines joined by "\n" (the definition of NewSourceLines).
func TestSourceLinesInFile(t *testing.T) {
	cases := []struct {
		name, file string
		lines      []string
		offs       []int
	}{
		{"lines of a fenced block", "```calc\na = 1\nb = 2\n```\n", []string{"a = 1", "b = 2"}, []int{8, 14}},
		{"CR LF line breaks", "```calc\r\na = 1\r\nb = 2\r\n```\r\n", []string{"a = 1", "b = 2"}, []int{9, 16}},
		{"lines of a list item, indented", "- x\n  ```calc\n  a = 1\n  b = 2\n  ```\n", []string{"a = 1", "b = 2"}, []int{16, 24}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			f := NewFile("doc.md", c.file)
			pos := make([]Pos, len(c.offs))
			for i, o := range c.offs {
				pos[i] = f.Pos(o)
				if got := c.file[o : o+len(c.lines[i])]; got != c.lines[i] {
					t.Fatalf("the test's offset %d holds %q, not line %q", o, got, c.lines[i])
				}
			}
			src := NewSourceLines(c.lines, pos)
			if want := strings.Join(c.lines, "\n"); src.Text != want {
				t.Errorf("text %q, want %q", src.Text, want)
			}
			// the first character of the second line is where the file has it
			if got, want := src.PosAt(len(c.lines[0])+1), pos[1]; got != want {
				t.Errorf("second line at %v, want %v", got.Off, want.Off)
			}
		})
	}
}

// TestEvalAllocations: evaluating a + b*c on bound names allocates one
// scalar, the result's, and no value for the product inside it.
func TestEvalAllocations(t *testing.T) {
	b := runBlock("a = 2 V\nb = 3 Ω\nc = 4 A\n")
	if errs := b.allErrors(); len(errs) > 0 {
		t.Fatal(errs)
	}
	var errs ErrorList
	x, _ := ParseExpr(NewSource("a + b*c", Pos{}), &errs)
	if len(errs) > 0 {
		t.Fatal(errs)
	}
	var v Value
	n := testing.AllocsPerRun(100, func() {
		var err error
		if v, err = b.env.Eval(x, nil); err != nil {
			t.Fatal(err)
		}
	})
	// hand derivation: 2 V + 3 Ω · 4 A = 14 V
	if s := v.(*Scalar); s.Z != 14 || s.Dim != DimVoltage {
		t.Errorf("a + b*c = %v, want 14 V", Describe(s))
	}
	if n > 1 {
		t.Errorf("%v allocations an evaluation, want 1 (the result)", n)
	}
}
