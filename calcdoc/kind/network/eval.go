package network

import (
	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind/network/mna"
	"calcdoc/calcdoc/kind/network/netlist"
	"calcdoc/expr"
)

// Result is what a network block evaluates to (Block.Result): the
// outcome of mna.Run and the displays its names were defined with.
type Result struct {
	*mna.Result
	// Errs are the block's errors (also in Block.Errors).
	Errs expr.ErrorList
	// Display is the display each defined name was given, by name.
	Display map[string]*expr.Display
}

// evalNetwork runs the block through mna.Run (parse, topology checks,
// evaluation of the elements, assembly, solve, acceptance) and defines
// V_NODE, I_NAME and S_NAME: with their values when the network was
// solved, as unavailable otherwise (so that a later line using one is
// not evaluated rather than reporting an unknown name), as a solve block
// does with its unknowns.
func evalNetwork(b *calcdoc.Block) {
	env := b.Env()
	at := b.InfoPos
	if !at.IsValid() {
		at = b.Pos
	}
	mb := mna.Block{Lines: b.Lines, LinePos: b.LinePos, Tag: b.Arg, TagPos: b.ArgPos, Pos: at}
	run := func() (*mna.Result, expr.ErrorList) {
		r, errs := mna.Run(mb, env, nil)
		for k, e := range errs {
			if !e.Pos.IsValid() { // an error of the block as a whole (no branches, say): at its opening line
				c := *e
				c.Pos = at
				errs[k] = &c
			}
		}
		return r, errs
	}
	if len(env.Cases) > 1 {
		prev := env.SetCase(0)
		prevDep := env.ResetCaseDep()
		defer func() {
			env.SetCase(prev)
			env.SetCaseDep(prevDep)
		}()
	}
	r, errs := run()
	var perCase map[string][]expr.Value
	if len(env.Cases) > 1 && env.CaseDep() {
		// elements that read a value with cases: the network is solved once
		// per case (the first case's is the one drawn)
		perCase, errs = casesOf(r, errs, env, run)
	}
	res := &Result{Result: r, Errs: errs, Display: map[string]*expr.Display{}}
	b.Result = res
	b.Errors = append(b.Errors, errs...)
	for _, d := range append(r.Defs(), unreadNodes(r)...) {
		if perCase != nil {
			defineCases(b, res, d, perCase[d.Name])
			continue
		}
		if d.Value == nil {
			if env.CanDefine(d.Name, d.Pos) == nil {
				env.Define(&expr.Binding{Name: d.Name, Pos: d.Pos, Unavailable: true})
			}
			continue
		}
		disp := env.ChooseDisplay(d.Value, nil, nil) // the preferred unit, else the unit of its dimension (a power by its kind)
		res.Display[d.Name] = disp
		if err := env.Define(&expr.Binding{Name: d.Name, Value: d.Value, Pos: d.Pos, Display: disp}); err != nil {
			b.Errors = append(b.Errors, err)
			res.Errs = append(res.Errs, err)
			continue
		}
		b.AddValue(&calcdoc.NamedValue{Name: d.Name, Pos: d.Pos, Value: d.Value, Display: disp})
	}
}

// unreadNodes lists V_NODE for the nodes the branches name when the lines
// did not pass the topology checks (Defs then lists only the branches'
// names): each is defined as unavailable, so that a later line that uses
// one is not evaluated rather than reporting an unknown name.
func unreadNodes(r *mna.Result) []mna.Def {
	if r.Net == nil || r.Topo != nil {
		return nil
	}
	ground := map[string]bool{}
	for _, g := range r.Net.Grounds {
		ground[g.Node.Key] = true
	}
	seen := map[string]bool{}
	var out []mna.Def
	add := func(nd netlist.Node) {
		if nd.Key == "" || ground[nd.Key] || seen[nd.Key] {
			return
		}
		seen[nd.Key] = true
		out = append(out, mna.Def{Name: r.Net.VoltageName(nd.Name), Kind: mna.DefVoltage, Pos: nd.Pos})
	}
	for _, b := range r.Net.Branches {
		add(b.From)
		add(b.To)
		if b.Element == netlist.Ratio {
			add(b.From2)
			add(b.To2)
		}
	}
	return out
}
