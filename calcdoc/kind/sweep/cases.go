package sweep

import (
	"calcdoc/calcdoc"
	"calcdoc/expr"
)

// evalSweep works a sweep block; one whose lines or range read a value
// with cases is worked once per case (LANGUAGE.md section 10): the first
// case's sweep is the block's Result, the others its CaseSweeps, and
// every error names its case.
func evalSweep(b *calcdoc.Block) {
	env := b.Env()
	if len(env.Cases) < 2 {
		evalSweepOnce(b)
		return
	}
	prev := env.SetCase(0)
	prevDep := env.ResetCaseDep()
	defer func() {
		env.SetCase(prev)
		env.SetCaseDep(prevDep)
	}()
	n0 := len(b.Errors)
	sw0 := evalSweepOnce(b)
	if !env.CaseDep() {
		return
	}
	nameCase(b.Errors[n0:], env.Cases[0])
	sw0.Case = env.Cases[0]
	for k := 1; k < len(env.Cases); k++ {
		env.SetCase(k)
		nk := len(b.Errors)
		sw := evalSweepOnce(b)
		nameCase(b.Errors[nk:], env.Cases[k])
		sw.Case = env.Cases[k]
		sw0.CaseSweeps = append(sw0.CaseSweeps, sw)
	}
	b.Result = sw0
}

// nameCase says in each error which case it happened in.
func nameCase(errs []*expr.Error, c string) {
	for _, e := range errs {
		e.Msg = "in case " + c + ": " + e.Msg
	}
}

// CaseSweepValuers are the sweeps of the cases after the first, for the
// values JSON (calcdoc.CaseSweepValuer).
func (sw *Sweep) CaseSweepValuers() []calcdoc.SweepValuer {
	var out []calcdoc.SweepValuer
	for _, c := range sw.CaseSweeps {
		out = append(out, c)
	}
	return out
}
