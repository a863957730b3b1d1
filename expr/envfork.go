package expr

import "maps"

// An incremental evaluation (calcdoc) starts again from the first block of
// a document that changed, with the names defined above it. Names are
// defined once and never removed, and a block defines its names at
// positions inside itself, so the environment before a block is the final
// one less the definitions at or after the block's start: Fork makes it.

// Fork returns a new environment holding the definitions of e (values,
// user functions, tables) whose position keep accepts, the values in the
// order they were defined. It shares the bindings, functions and tables
// with e (none is changed after its definition) and e's preferred units
// and cases; its budget is nil (the caller gives one) and its current
// case the first. e is not changed.
func (e *Env) Fork(keep func(Pos) bool) *Env {
	// Cloned whole and thinned: a copy of the table is cheaper than
	// inserting every name again, and an edit near the end leaves out few.
	f := &Env{vars: maps.Clone(e.vars), funcs: map[string]*Func{}, Preferred: e.Preferred, Cases: e.Cases}
	if f.vars == nil {
		f.vars = map[string]*Binding{}
	}
	// the names left out, as written: Define gives each key one name in
	// order, so a name written alike is the same binding
	var out map[string]bool
	for k, b := range e.vars {
		if !keep(b.Pos) {
			delete(f.vars, k)
			if out == nil {
				out = map[string]bool{}
			}
			out[b.Name] = true
		}
	}
	if out == nil {
		f.order = append(make([]string, 0, len(e.order)), e.order...)
	} else {
		f.order = make([]string, 0, len(f.vars))
		for _, n := range e.order {
			if !out[n] {
				f.order = append(f.order, n)
			}
		}
	}
	for k, fn := range e.funcs {
		if keep(fn.Pos) {
			f.funcs[k] = fn
		}
	}
	for k, t := range e.tables {
		if keep(t.pos) {
			if f.tables == nil {
				f.tables = map[string]*tableBinding{}
			}
			f.tables[k] = t
		}
	}
	return f
}

// Counts returns how many values, user functions and tables e defines.
func (e *Env) Counts() (values, funcs, tables int) { return len(e.vars), len(e.funcs), len(e.tables) }

// KeysWhere returns the keys (NameKey) of the names e defines (values,
// user functions, tables) whose position keep accepts, in no order.
func (e *Env) KeysWhere(keep func(Pos) bool) []string {
	var out []string
	for k, b := range e.vars {
		if keep(b.Pos) {
			out = append(out, k)
		}
	}
	for k, fn := range e.funcs {
		if keep(fn.Pos) {
			out = append(out, k)
		}
	}
	for k, t := range e.tables {
		if keep(t.pos) {
			out = append(out, k)
		}
	}
	return out
}
