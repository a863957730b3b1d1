package network

import (
	"calcdoc/calcdoc"
	"calcdoc/calcdoc/kind/network/mna"
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
	r, errs := mna.Run(mb, env, nil)
	res := &Result{Result: r, Errs: errs, Display: map[string]*expr.Display{}}
	b.Result = res
	b.Errors = append(b.Errors, errs...)
	for _, d := range r.Defs() {
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
