package calc

import (
	"calcdoc/calcdoc"
	"calcdoc/expr"
)

// evalCalc evaluates a calc block: its statements, top to bottom, in the
// document's names.
func evalCalc(b *calcdoc.Block) {
	if b.Arg != "" {
		b.Errorf(b.ArgPos, "a calc block takes nothing after the word calc (found %q)", b.Arg)
	}
	var errs expr.ErrorList
	stmts := expr.ParseBlock(b.Source(), expr.CalcMode, &errs)
	b.Result = calcdoc.EvalStatements(b, stmts, errs)
}
