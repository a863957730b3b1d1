package calcdoc

import (
	"calcdoc/expr"

	"github.com/yuin/goldmark/ast"
)

// Block is one evaluated fenced block: its kind word ("calc", "solve",
// ...), the rest of its info string, its lines with their positions in the
// file, and what its kind made of it.
type Block struct {
	Kind    string
	Arg     string   // the info string after the kind word
	ArgPos  expr.Pos // where Arg starts
	InfoPos expr.Pos
	Pos     expr.Pos // the opening fence line
	Lines   []string
	LinePos []expr.Pos
	Node    ast.Node
	// Result is what the block's kind made of it: []*Stmt for calc, and
	// the kind's own type for the others.
	Result any
	Errors []*expr.Error
	// DrawErrors are the errors of Errors that a picture of the block
	// cannot be drawn (see DrawChecker).
	DrawErrors []*expr.Error
	doc        *Document
	kind       Kind
	memo       *blockMemo // shared with the block it was taken over from (incremental.go)
	takenOver  bool
	twin       uint64 // DrawnLike (below.go)
}

// KindOf returns the kind that evaluated the block.
func (b *Block) KindOf() Kind { return b.kind }

// Doc returns the document the block belongs to.
func (b *Block) Doc() *Document { return b.doc }

// Env is the environment of names the block sees and defines into.
func (b *Block) Env() *expr.Env { return b.doc.Env }

// Errorf records an error of the block.
func (b *Block) Errorf(pos expr.Pos, format string, args ...any) {
	b.Errors = append(b.Errors, expr.Errorf(pos, format, args...))
}

// AddValue lists a defined name among the document's values.
func (b *Block) AddValue(v *NamedValue) { b.doc.Values = append(b.doc.Values, v) }

// AddCheck lists a check among the document's checks.
func (b *Block) AddCheck(c *CheckRecord) { b.doc.Checks = append(b.doc.Checks, c) }

// SplitTopLevel splits s at the commas outside parentheses and brackets,
// returning each part with its byte offset in s.
func SplitTopLevel(s string) (parts []string, offs []int) {
	depth, start := 0, 0
	for i := 0; i < len(s); i++ {
		switch s[i] {
		case '(', '[':
			depth++
		case ')', ']':
			if depth > 0 {
				depth--
			}
		case ',':
			if depth == 0 {
				parts, offs = append(parts, s[start:i]), append(offs, start)
				start = i + 1
			}
		}
	}
	return append(parts, s[start:]), append(offs, start)
}

// ArgAt is the position of byte offset off of the block's argument (the
// argument stands verbatim in the file at ArgPos).
func (b *Block) ArgAt(off int) expr.Pos { return b.ArgPos.Add(off) }

// Attach makes b a block of d without evaluating it, so that a kind's
// stages can be run on it alone (the solve kind's benchmarks do).
func (d *Document) Attach(b *Block) *Block {
	b.doc = d
	return b
}

// PerCase runs run for the document's first case and, when that read a
// value with cases, once more for each other case (LANGUAGE.md section
// 10), naming its case in every error a run adds to the block. It returns
// how many cases were run: 1 when the block does not depend on a case or
// the document has none (run is then called once, with k = 0).
func (b *Block) PerCase(run func(k int)) int {
	env := b.Env()
	if len(env.Cases) < 2 {
		run(0)
		return 1
	}
	prev := env.SetCase(0)
	prevDep := env.ResetCaseDep()
	defer func() {
		env.SetCase(prev)
		env.SetCaseDep(prevDep)
	}()
	n0 := len(b.Errors)
	run(0)
	if !env.CaseDep() {
		return 1
	}
	NameCase(b.Errors[n0:], env.Cases[0])
	for k := 1; k < len(env.Cases); k++ {
		env.SetCase(k)
		nk := len(b.Errors)
		run(k)
		NameCase(b.Errors[nk:], env.Cases[k])
	}
	return len(env.Cases)
}

// NameCase says in each error which case it happened in.
func NameCase(errs []*expr.Error, c string) {
	for _, e := range errs {
		e.Msg = "in case " + c + ": " + e.Msg
	}
}
