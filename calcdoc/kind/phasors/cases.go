package phasors

import (
	"calcdoc/calcdoc"
	"calcdoc/expr"
)

// evalPhasors evaluates a phasors block (evalPhasorsOnce); one whose
// entries read a value with cases is drawn once per case (LANGUAGE.md
// section 10): the first case's diagram is the block's Result, the others
// its CaseDiagrams, and every error names its case.
func evalPhasors(b *calcdoc.Block) {
	env := b.Env()
	if len(env.Cases) < 2 {
		evalPhasorsOnce(b)
		return
	}
	prev := env.SetCase(0)
	prevDep := env.ResetCaseDep()
	defer func() {
		env.SetCase(prev)
		env.SetCaseDep(prevDep)
	}()
	n0 := len(b.Errors)
	res := evalPhasorsOnce(b)
	if !env.CaseDep() {
		return
	}
	nameCase(b.Errors[n0:], env.Cases[0])
	res.Case = env.Cases[0]
	for k := 1; k < len(env.Cases); k++ {
		env.SetCase(k)
		nk := len(b.Errors)
		r := evalPhasorsOnce(b)
		nameCase(b.Errors[nk:], env.Cases[k])
		r.Case = env.Cases[k]
		res.CaseDiagrams = append(res.CaseDiagrams, r)
	}
	b.Result = res
}

// nameCase says in each error which case it happened in.
func nameCase(errs []*expr.Error, c string) {
	for _, e := range errs {
		e.Msg = "in case " + c + ": " + e.Msg
	}
}
