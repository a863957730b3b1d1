package calcdoc_test

import (
	"strings"
	"testing"

	"calcdoc/calcdoc"
	"calcdoc/expr"
)

// countKind is a block kind that counts its evaluations and reports one
// error of the block as a whole (no position of its own).
type countKind struct{ evals *int }

func (countKind) Words() []string { return []string{"count"} }

func (k countKind) Eval(b *calcdoc.Block) {
	*k.evals++
	b.Errors = append(b.Errors, &expr.Error{Msg: "the block as a whole"})
}

// TestParseOnlyThenEvaluate: ParseOnly collects the blocks and inline
// values with their positions and evaluates nothing; Evaluate evaluates
// them once, in document order; Parse does both. An error a kind reports
// without a position stands at its block's opening line.
func TestParseOnlyThenEvaluate(t *testing.T) {
	// counted by hand: the count fence is line 3; on line 6 "Inline: `="
	// is 10 characters, so the expression starts at column 11 and its
	// "+" (where the sum fails) stands at column 15
	src := "# T\n\n```count\nx\n```\nInline: `=1 V + 2 A`.\n"
	n := 0
	reg := calcdoc.NewRegistry(countKind{&n})
	d := calcdoc.ParseOnly("c.md", []byte(src), reg)
	if n != 0 || len(d.Errors) != 0 {
		t.Fatalf("ParseOnly evaluated: %d evaluations, errors %v", n, d.Errors)
	}
	if len(d.Blocks) != 1 || d.Blocks[0].Result != nil || d.Blocks[0].Pos.Line() != 3 || d.Blocks[0].LinePos[0].Line() != 4 {
		t.Fatalf("blocks %+v", d.Blocks)
	}
	if len(d.Inline) != 1 || d.Inline[0].Value != nil || d.Inline[0].Pos.Position() != (expr.Position{Filename: "c.md", Line: 6, Col: 11}) {
		t.Fatalf("inline %+v at %v", d.Inline, d.Inline[0].Pos.Position())
	}
	d.Evaluate()
	d.Evaluate()
	if n != 1 {
		t.Errorf("%d evaluations, want 1", n)
	}
	var got []string
	for _, e := range d.Errors {
		got = append(got, e.Error())
	}
	want := []string{"c.md:3:1: the block as a whole", "c.md:6:15: cannot add 1 V and 2 A"}
	if len(got) != 2 || got[0] != want[0] || !strings.HasPrefix(got[1], want[1]) {
		t.Errorf("errors %q, want %q", got, want)
	}
	n = 0
	if p := calcdoc.Parse("c.md", []byte(src), reg); n != 1 || len(p.Errors) != 2 {
		t.Errorf("Parse: %d evaluations, %d errors", n, len(p.Errors))
	}
}
