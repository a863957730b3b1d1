package expr

import "math/cmplx"

// val is a value inside one evaluation: a scalar held inline (m == nil)
// or a matrix. The evaluator passes vals, not Values, so that the
// intermediate results of an expression such as a + b*c cost no heap
// allocation; a val becomes a public Value (value) only where it is
// kept: a binding, a trace entry, the result of Eval.
type val struct {
	s Scalar
	m *Matrix
	// box, when not nil, is a stored *Scalar equal to s (the value of a
	// bound name, a constant, a value already put in the trace): value
	// returns it instead of allocating a copy. Whatever changes s clears
	// it.
	box *Scalar
}

// scalarVal is a computed scalar.
func scalarVal(s Scalar) val { return val{s: s} }

// unbox is the val of a public value; a *Scalar is kept as its box.
func unbox(v Value) val {
	switch x := v.(type) {
	case *Scalar:
		return val{s: *x, box: x}
	case *Matrix:
		return val{m: x}
	}
	return val{}
}

// value is v as a public Value, allocating a *Scalar only for a scalar
// that has none yet.
func (v *val) value() Value {
	if v.m != nil {
		return v.m
	}
	if v.box == nil {
		s := v.s
		v.box = &s
	}
	return v.box
}

// isScalar reports whether v is a single value.
func (v *val) isScalar() bool { return v.m == nil }

// hasTemp reports whether v is, or holds, an absolute temperature.
func (v *val) hasTemp() bool {
	if v.m != nil {
		return hasTemp(v.m)
	}
	return v.s.AbsTemp
}

// withoutTemp is v with the absolute-temperature mark taken off.
func (v val) withoutTemp() val {
	if v.m != nil {
		return val{m: withoutTemp(v.m).(*Matrix)}
	}
	if v.s.AbsTemp {
		v.s.AbsTemp = false
		v.box = nil
	}
	return v
}

// settle makes the power kind of v consistent (settleKind), keeping its
// box when nothing changes.
func (v *val) settle() {
	if v.m != nil {
		v.m = settleKinds(v.m).(*Matrix)
		return
	}
	if k := settledKind(&v.s); k != v.s.Kind {
		v.s.Kind = k
		v.box = nil
	}
}

// describe names v for an error message (Describe).
func (v *val) describe() string {
	if v.m != nil {
		return Describe(v.m)
	}
	s := v.s
	return Describe(&s)
}

// finiteZ reports whether neither part of z is infinite or NaN.
func finiteZ(z complex128) bool { return !cmplx.IsNaN(z) && !cmplx.IsInf(z) }

// check is what every node's value goes through (it was node's): the
// work of looking at a matrix's entries, finite, of a physical unit, its
// power kind settled, recorded in the trace.
func (ev *evaluator) check(n Node, v *val) error {
	if v.m != nil {
		if k := int64(len(v.m.E)); k > 1 {
			if err := ev.charge(EntryWork*k, n.Pos()); err != nil {
				return err
			}
		}
		if err := nonFinite(n, v.m); err != nil {
			return err
		}
	} else if !finiteZ(v.s.Z) {
		return nonFinite(n, v.value())
	}
	v.settle()
	if v.m != nil && !dimsInRange(v.m) || v.m == nil && !v.s.Dim.InRange() {
		return Errorf(n.Pos(), "the unit of this value has an exponent beyond ±%d: not a physical quantity", MaxExponent)
	}
	if ev.trace != nil {
		switch n.(type) {
		case *Ident, *Call:
			ev.trace.record(n, v.value())
		}
	}
	return nil
}

// productWorkVal is productWork for vals: the multiply-adds of a product
// of two matrices, else 0.
func productWorkVal(n *Binary, x, y *val) int64 {
	if x.m == nil || y.m == nil {
		return 0
	}
	return productWork(n, x.m, y.m)
}

// isLocal reports whether key names a parameter or a local name.
func (ev *evaluator) isLocal(key string) bool {
	_, ok := ev.local(key)
	return ok
}
