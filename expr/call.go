package expr

import (
	"fmt"
	"math"
)

// Calls: a built-in or user function, an entry of a matrix value, a
// look-up in a table (tables.go) or casemax/casemin (cases.go).

func (ev *evaluator) call(n *Call) (val, error) {
	name, key := n.Fun.Name, n.Fun.key()
	if n.Fun.Dot > 0 || tableFuncs[key] {
		return ev.lookup(n) // a look-up in a table (tables.go)
	}
	// an entry of a matrix value: M(i, j), v(i)
	if v, ok := ev.local(key); ok {
		if v.m == nil {
			return val{}, Errorf(n.P, "%q is a value, not a function or a matrix: it cannot be called or indexed", n.Fun.Name)
		}
		return ev.index(n, v.m)
	}
	if b := ev.env.vars[key]; b != nil {
		if b.Unavailable {
			return val{}, &UnavailableError{Pos: n.Fun.P, Name: name, Def: b.cause()}
		}
		v, err := ev.env.bindingValue(b, n.Fun.P, name)
		if err != nil {
			return val{}, err
		}
		return ev.index(n, v)
	}
	if key == "casemax" || key == "casemin" {
		return ev.caseExtreme(n, key == "casemax")
	}
	// the arguments, held on the stack for the usual few
	var buf [4]val
	args := buf[:0]
	f := ev.env.funcs[key]
	kelvin := !keepsTemp[key] || f != nil
	for _, a := range n.Args {
		v, err := ev.eval(a)
		if err != nil {
			return val{}, err
		}
		if kelvin {
			v = ev.inKelvin(a, v) // a function takes an absolute temperature in K
		}
		args = append(args, v)
	}
	if f != nil {
		return ev.callFunc(n, f, args)
	}
	bf, ok := builtins[key]
	if !ok {
		return val{}, Errorf(n.Fun.P, "unknown function %q%s", name, ev.suggestFunc(name))
	}
	if len(args) < bf.min || (bf.max >= 0 && len(args) > bf.max) {
		want := fmt.Sprint(bf.min)
		if bf.max != bf.min {
			if bf.max < 0 {
				want = fmt.Sprintf("at least %d", bf.min)
			} else {
				want = fmt.Sprintf("%d to %d", bf.min, bf.max)
			}
		}
		pl := plural(bf.max) // "1 to 3 arguments"
		if bf.max < 0 {
			pl = plural(bf.min) // "at least 1 argument"
		}
		return val{}, Errorf(n.P, "%s takes %s argument%s, not %d", name, want, pl, len(args))
	}
	if key == "polar" && len(args) == 2 && args[1].m == nil {
		if err := checkAngle(n.Args[1], &args[1].s, "the second argument of polar"); err != nil {
			return val{}, err
		}
	}
	if bf.one != nil && len(args) == 1 && args[0].m == nil {
		// a function of one single value: no argument list, no box
		// (the work is builtinWork's for one scalar argument)
		if err := ev.charge(EntryWork, n.P); err != nil {
			return val{}, err
		}
		s, err := bf.one(args[0].s)
		if err != nil {
			return val{}, Errorf(n.P, "%s: %s", name, err.Error())
		}
		return val{s: s}, nil
	}
	vals := make([]Value, len(args))
	for i := range args {
		vals[i] = args[i].value()
	}
	if err := ev.charge(builtinWork(key, vals), n.P); err != nil {
		return val{}, err
	}
	v, err := bf.fn(vals)
	if err != nil {
		return val{}, Errorf(n.P, "%s: %s", name, err.Error())
	}
	return unbox(v), nil
}

// callFunc calls the user function f of n with the arguments' values.
func (ev *evaluator) callFunc(n *Call, f *Func, args []val) (val, error) {
	name := n.Fun.Name
	if len(args) != len(f.Params) {
		return val{}, Errorf(n.P, "%s takes %d argument%s (defined at line %d), not %d", name, len(f.Params), plural(len(f.Params)), f.Pos.Line(), len(args))
	}
	if ev.depth >= MaxCallDepth {
		return val{}, Errorf(n.P, "functions call each other too deeply (more than %d levels)", MaxCallDepth)
	}
	if err := ev.charge(CallWork+int64(len(args)), n.P); err != nil {
		return val{}, err
	}
	sub := evaluator{env: ev.env, params: f.keys, args: args, depth: ev.depth + 1}
	v, err := sub.eval(f.Body)
	if err != nil {
		if e, ok := err.(*Error); ok && e == ev.env.Budget.Over() {
			// the work is the calling line's: the error moves out to
			// the outermost call, on that line
			e.Pos = n.P
			return val{}, e
		}
		if e, ok := err.(*Error); ok {
			return val{}, Errorf(n.P, "in %s (defined at line %d): %s", name, f.Pos.Line(), e.Msg)
		}
		return val{}, err
	}
	return v, nil
}

func (ev *evaluator) suggestFunc(name string) string {
	best, bestD := "", 3
	if !ev.env.Budget.TryCharge(suggestWork * int64(len(builtins)+len(ev.env.funcs))) {
		return ""
	}
	for k := range builtins {
		if d := editDistance(name, k); d < bestD && d <= len(name)/2 {
			best, bestD = k, d
		}
	}
	for k := range ev.env.funcs {
		if d := editDistance(name, k); d < bestD && d <= len(name)/2 {
			best, bestD = k, d
		}
	}
	if best != "" {
		return fmt.Sprintf(" (did you mean %q?)", best)
	}
	return ""
}

func plural(n int) string {
	if n == 1 {
		return ""
	}
	return "s"
}

func (ev *evaluator) index(n *Call, v Value) (val, error) {
	m, ok := v.(*Matrix)
	if !ok {
		return val{}, Errorf(n.P, "%q is a value, not a function or a matrix: it cannot be called or indexed", n.Fun.Name)
	}
	var ibuf [2]int
	idx := ibuf[:0]
	if len(n.Args) > len(ibuf) {
		idx = make([]int, 0, len(n.Args))
	}
	for _, a := range n.Args {
		x, err := ev.eval(a)
		if err != nil {
			return val{}, err
		}
		s := &x.s
		if x.m != nil || !s.Dim.IsZero() || !s.IsReal() || real(s.Z) != math.Trunc(real(s.Z)) {
			return val{}, Errorf(a.Pos(), "an index must be a whole number counting from 1, not %s", x.describe())
		}
		idx = append(idx, int(real(s.Z)))
	}
	switch len(idx) {
	case 1:
		k := idx[0]
		if m.Cols != 1 && m.Rows != 1 {
			return val{}, Errorf(n.P, "%q is a %d×%d matrix: pick an entry with two indices, %s(row, column)", n.Fun.Name, m.Rows, m.Cols, n.Fun.Name)
		}
		if k < 1 || k > len(m.E) {
			return val{}, Errorf(n.Args[0].Pos(), "index %d out of range: %s has %d entries (counting from 1)", k, n.Fun.Name, len(m.E))
		}
		return val{s: m.E[k-1]}, nil
	case 2:
		i, j := idx[0], idx[1]
		if i < 1 || i > m.Rows {
			return val{}, Errorf(n.Args[0].Pos(), "row %d out of range: %s has %d rows (counting from 1)", i, n.Fun.Name, m.Rows)
		}
		if j < 1 || j > m.Cols {
			return val{}, Errorf(n.Args[1].Pos(), "column %d out of range: %s has %d columns (counting from 1)", j, n.Fun.Name, m.Cols)
		}
		return val{s: m.At(i-1, j-1)}, nil
	}
	return val{}, Errorf(n.P, "an entry is picked with one index (a vector) or two (a matrix), not %d", len(idx))
}
