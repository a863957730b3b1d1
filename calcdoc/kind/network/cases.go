package network

import (
	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind/network/mna"
	"calcdoc/expr"
)

// casesOf solves the network for every case after the first (whose result
// is r and errs) and gathers each defined name's value per case (nil in a
// case that did not solve). Each error names its case.
func casesOf(r *mna.Result, errs expr.ErrorList, env *expr.Env, run func() (*mna.Result, expr.ErrorList)) (map[string][]expr.Value, expr.ErrorList) {
	n := len(env.Cases)
	per := map[string][]expr.Value{}
	add := func(k int, res *mna.Result) {
		for _, d := range res.Defs() {
			if per[d.Name] == nil {
				per[d.Name] = make([]expr.Value, n)
			}
			if d.Value != nil {
				per[d.Name][k] = d.Value
			}
		}
	}
	var out expr.ErrorList
	named := func(k int, es expr.ErrorList) {
		for _, e := range es {
			c := *e
			c.Msg = "in case " + env.Cases[k] + ": " + e.Msg
			out = append(out, &c)
		}
	}
	add(0, r)
	named(0, errs)
	for k := 1; k < n; k++ {
		env.SetCase(k)
		rk, ek := run()
		add(k, rk)
		named(k, ek)
	}
	env.SetCase(0)
	return per, out
}

// defineCases defines a name of a network solved per case: one value per
// case, unavailable where no case gave one.
func defineCases(b *calcdoc.Block, res *Result, d mna.Def, cases []expr.Value) {
	env := b.Env()
	var first expr.Value
	for _, v := range cases {
		if v != nil {
			first = v
			break
		}
	}
	if first == nil {
		if env.CanDefine(d.Name, d.Pos) == nil {
			env.Define(&expr.Binding{Name: d.Name, Pos: d.Pos, Unavailable: true})
		}
		return
	}
	disp := env.ChooseDisplay(first, nil, nil)
	res.Display[d.Name] = disp
	if err := env.Define(&expr.Binding{Name: d.Name, Value: first, Pos: d.Pos, Display: disp, Cases: cases}); err != nil {
		b.Errors = append(b.Errors, err)
		res.Errs = append(res.Errs, err)
		return
	}
	b.AddValue(&calcdoc.NamedValue{Name: d.Name, Pos: d.Pos, Value: first, Display: disp, Cases: cases})
}
