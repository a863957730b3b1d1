package phasors

import (
	"calcdoc/calcdoc"
)

// evalPhasors evaluates a phasors block (evalPhasorsOnce); one whose
// entries read a value with cases is drawn once per case (LANGUAGE.md
// section 10): the first case's diagram is the block's Result, the others
// its CaseDiagrams, and every error names its case.
func evalPhasors(b *calcdoc.Block) {
	var all []*Phasors
	n := b.PerCase(func(int) { all = append(all, evalPhasorsOnce(b)) })
	res := all[0]
	if n > 1 {
		cases := b.Env().Cases
		for k, r := range all {
			r.Case = cases[k]
		}
		res.CaseDiagrams = all[1:]
	}
	b.Result = res
}
