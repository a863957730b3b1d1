package calcdoc

import "calcdoc/expr"

// stmtKind evaluates calc blocks as calcdoc/kind/calc does, for the
// internal tests of the kinds still in this package.
type stmtKind struct{}

func (stmtKind) Words() []string { return []string{"calc"} }
func (stmtKind) Eval(b *Block) {
	var errs expr.ErrorList
	b.Result = EvalStatements(b, expr.ParseBlock(b.Source(), expr.CalcMode, &errs), errs)
}

var testKinds = NewRegistry(stmtKind{}, SolveKind)
