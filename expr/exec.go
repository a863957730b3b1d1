package expr

import (
	"fmt"
	"math"
	"math/cmplx"
)

// CheckResult is the outcome of a check: the value of every operand of
// the comparison chain, whether each comparison holds, and whether all do.
type CheckResult struct {
	Pass   bool
	Values []*Scalar
	Holds  []bool
	// Utilisation is the share of the limit used, for a check of the form
	// a <= b, a < b (a/b) or a >= b, a > b (b/a), with both sides real and
	// positive; HasUtil says whether it applies.
	Utilisation float64
	HasUtil     bool
}

// EqualTolerance is the relative tolerance of "==" and "!=" in a check:
// a == b holds when |a − b| <= 1e-9·max(|a|, |b|).
const EqualTolerance = 1e-9

// EvalCheck evaluates a comparison chain.
func (e *Env) EvalCheck(c *Compare, trace *Trace) (*CheckResult, error) {
	ev := evaluator{env: e, trace: trace}
	// the result, its lists and its computed values in one allocation
	// for a check of one comparison
	ca := new(checkAlloc)
	res := &ca.res
	res.Pass = true
	if len(c.X) <= len(ca.vals) {
		res.Values, res.Holds = ca.vals[:0:len(c.X)], ca.holds[:0:len(c.Ops)]
	} else {
		res.Values, res.Holds = make([]*Scalar, 0, len(c.X)), make([]bool, 0, len(c.Ops))
	}
	for i, x := range c.X {
		v, err := ev.eval(x)
		if err != nil {
			return nil, err
		}
		if v.m != nil {
			return nil, Errorf(x.Pos(), "a check compares single values, not %s", shapeWord(v.m))
		}
		s := v.box
		if s == nil && i < len(ca.scalars) {
			ca.scalars[i] = v.s
			s = &ca.scalars[i]
		} else if s == nil {
			s = v.value().(*Scalar)
		}
		if !s.IsFinite() {
			// never a verdict on a value that is not finite (LANGUAGE.md section 4)
			return nil, Errorf(x.Pos(), "this side of the check is not a finite value: no verdict")
		}
		res.Values = append(res.Values, s)
	}
	for i, op := range c.Ops {
		a, b := res.Values[i], res.Values[i+1]
		if _, ok := sumDim(a, b); !ok {
			return nil, Errorf(c.X[i+1].Pos(), "cannot compare %s with %s: the units differ (%s and %s)", Describe(a), Describe(b), dimWord(a.Dim), dimWord(b.Dim))
		}
		if err := compareTemp(c.X[i+1].Pos(), a, b); err != nil {
			return nil, err
		}
		var h bool
		switch op {
		case EQ, NE:
			diff := cmplx.Abs(a.Z - b.Z)
			eq := diff <= EqualTolerance*math.Max(cmplx.Abs(a.Z), cmplx.Abs(b.Z))
			h = eq == (op == EQ)
		default:
			for k, s := range []*Scalar{a, b} {
				if !s.IsReal() {
					return nil, Errorf(c.X[i+k].Pos(), "cannot compare the complex value %s with %s: compare abs(...), re(...) or im(...)", Describe(s), op)
				}
			}
			x, y := real(a.Z), real(b.Z)
			switch op {
			case LT:
				h = x < y
			case LE:
				h = x <= y
			case GT:
				h = x > y
			case GE:
				h = x >= y
			}
		}
		res.Holds = append(res.Holds, h)
		res.Pass = res.Pass && h
	}
	// no share of a limit for absolute temperatures: 80 °C against 90 °C
	// is not 97 % of anything (temperature.go)
	if len(c.Ops) == 1 && res.Values[0].IsReal() && res.Values[1].IsReal() && !res.Values[0].AbsTemp && !res.Values[1].AbsTemp {
		x, y := real(res.Values[0].Z), real(res.Values[1].Z)
		switch c.Ops[0] {
		case LT, LE:
			if x >= 0 && y > 0 {
				res.Utilisation, res.HasUtil = x/y, true
			}
		case GT, GE:
			if y >= 0 && x > 0 {
				res.Utilisation, res.HasUtil = y/x, true
			}
		}
		// a share that overflows (1e300 against 1e-10) is not shown
		if math.IsInf(res.Utilisation, 0) {
			res.Utilisation, res.HasUtil = 0, false
		}
	}
	return res, nil
}

// checkAlloc is a CheckResult with room for the two values of a check
// of one comparison (EvalCheck).
type checkAlloc struct {
	res     CheckResult
	vals    [2]*Scalar
	holds   [1]bool
	scalars [2]Scalar
}

// Result is what executing one statement gives.
type Result struct {
	Stmt  Stmt
	Value Value        // the value of an assignment or a bare expression
	Check *CheckResult // for a check
	Trace *Trace       // the values of the names in the statement's expression
	// Cases is the value in each case of the document (Env.Cases) for a
	// value that depends on a case, else nil; Value is then Cases[0].
	Cases []Value
	// CaseChecks is a check's result in each case, for a check that
	// depends on a case or names its cases (nil in a case it does not
	// apply to, or one whose sides could not be had: CaseErrs says why).
	// Check is then the governing case's result, its Pass true only when
	// every case's holds.
	CaseChecks []*CheckResult
	CaseErrs   []error
	// Governing is the case of the highest utilisation (or the first
	// failing one) of a check with cases.
	Governing string
	Err       error // an *Error or an *UnavailableError, or nil

	// Display is the display the value is shown in (ChooseDisplay: the
	// line's bracket, the literal's unit, the preferred unit), or nil.
	Display *Display
}

// Exec evaluates one statement in e and defines what it names. A name
// whose definition fails is defined as unavailable, so later lines that
// use it say so once instead of repeating the error.
func (e *Env) Exec(s Stmt) *Result {
	// the result and its trace in one allocation, from a slab that grows
	// with the statements (arena.go); the trace records into a buffer
	// the environment reuses and keeps a copy of exactly its length
	mem := e.memory()
	rt := mem.results.alloc(slabLimit)
	r := &rt.r
	r.Stmt, r.Trace = s, &rt.t
	r.Trace.entries = mem.traceBuf[:0]
	mem.traceBuf = nil // a nested Exec (none today) would start its own
	e.exec(s, r)
	buf := r.Trace.entries
	r.Trace.entries = mem.entries.keep(buf, 8*slabLimit)
	clear(buf)
	mem.traceBuf = buf[:0]
	return r
}

// exec is Exec's work on r.
func (e *Env) exec(s Stmt, r *Result) {
	e.Budget.Begin(s.Pos(), "line")
	switch s := s.(type) {
	case *Note:
	case *BadStmt:
		e.defineUnavailable(s.Names)
	case *Assign:
		for i, id := range s.Names {
			if err := e.canDefine(id.Name, id.key(), id.P); err != nil {
				r.Err = err
				return
			}
			for _, prev := range s.Names[:i] {
				if prev.key() == id.key() {
					r.Err = Errorf(id.P, "%q is listed twice before \"=\"%s: each name is defined once", id.Name, sameNameNote(id.Name, prev.Name))
					return
				}
			}
		}
		v, cases, err := e.evalCases(s.X, r.Trace)
		if err != nil {
			r.Err = err
			cause := s.Names[0].P
			if u, ok := err.(*UnavailableError); ok {
				cause = u.Def
			}
			e.defineUnavailableAt(s.Names, cause)
			return
		}
		r.Value = v
		if len(s.Names) > 1 {
			m, ok := v.(*Matrix)
			if !ok || (m.Cols != 1 && m.Rows != 1) || len(m.E) != len(s.Names) {
				r.Err = Errorf(s.Names[0].P, "%d names are assigned but the value is %s: give as many names as it has entries", len(s.Names), shapeWord(v))
				e.defineUnavailable(s.Names)
				return
			}
			for i, id := range s.Names {
				x := m.E[i]
				b := &Binding{Name: id.Name, Value: &x, Pos: id.P, Display: s.Display}
				if cases != nil {
					b.Cases = make([]Value, len(cases))
					for k, c := range cases {
						if c != nil {
							y := c.(*Matrix).E[i]
							b.Cases[k] = &y
						}
					}
				}
				e.put(id.key(), b) // each name passed canDefine above
			}
			return
		}
		if err := checkDisplayCases(v, cases, s.Display); err != nil {
			// a line whose display unit fails defines nothing: later uses
			// of the name get "not defined because its line has an error"
			r.Err = Errorf(s.Display.P, "%s: %s", s.Names[0].Name, err.Error())
			r.Value = nil
			e.defineUnavailableAt(s.Names, s.Names[0].P)
			return
		}
		kv, kerr := bracketKind(v, s.X, s.Display)
		if kerr != nil {
			// a bracket that relabels a power of another kind defines nothing either
			r.Err = kerr
			r.Value = nil
			e.defineUnavailableAt(s.Names, s.Names[0].P)
			return
		}
		v, r.Value = kv, kv
		if cases != nil {
			for k := range cases {
				if cases[k] == nil {
					continue
				}
				if cases[k], kerr = bracketKind(cases[k], s.X, s.Display); kerr != nil {
					r.Err, r.Value = kerr, nil
					e.defineUnavailableAt(s.Names, s.Names[0].P)
					return
				}
			}
		}
		r.Cases = cases
		disp := e.ChooseDisplay(v, s.Display, s.X)
		r.Display = disp
		b := e.memory().bindings.alloc(slabLimit)
		*b = Binding{Name: s.Names[0].Name, Value: v, Pos: s.Names[0].P, Display: disp, Cases: cases}
		e.put(s.Names[0].key(), b) // the name passed canDefine above
	case *FuncDef:
		if err := e.CanDefine(s.Name.Name, s.Name.P); err != nil {
			r.Err = err
			return
		}
		params := map[string]bool{}
		var names []string
		for _, p := range s.Params {
			if params[p.key()] {
				r.Err = Errorf(p.P, "parameter %q is listed twice", p.Name)
				return
			}
			if IsBuiltin(p.Name) {
				r.Err = Errorf(p.P, "parameter %q would hide a built-in: choose another name", p.Name)
				return
			}
			params[p.key()] = true
			names = append(names, p.Name)
		}
		if err := e.checkBody(s.Body, s.Name, params); err != nil {
			r.Err = err
			return
		}
		e.DefineFunc(&Func{Name: s.Name.Name, Params: names, Body: s.Body, Pos: s.Name.P})
	case *Check:
		e.execCheck(s, r)
	case *ExprStmt:
		v, cases, err := e.evalCases(s.X, r.Trace)
		r.Value, r.Err = v, err
		if err == nil {
			if derr := checkDisplayCases(v, cases, s.Display); derr != nil {
				r.Err = Errorf(s.Display.P, "%s", derr.Error())
			} else if kv, kerr := bracketKind(v, s.X, s.Display); kerr != nil {
				r.Err = kerr
			} else {
				r.Value = kv
				if cases != nil {
					for k := 0; k < len(cases) && r.Err == nil; k++ {
						if cases[k] != nil {
							cases[k], r.Err = bracketKind(cases[k], s.X, s.Display)
						}
					}
					if r.Err == nil {
						r.Cases = cases
					}
				}
			}
			r.Display = e.ChooseDisplay(r.Value, s.Display, s.X)
		}
	default:
		r.Err = Errorf(s.Pos(), "this statement is not allowed here")
	}
	return
}

func (e *Env) defineUnavailable(names []*Ident) {
	if len(names) > 0 {
		e.defineUnavailableAt(names, names[0].P)
	}
}

// defineUnavailableAt marks names as having no value because of the
// failure at cause.
func (e *Env) defineUnavailableAt(names []*Ident, cause Pos) {
	for _, id := range names {
		if key := id.key(); e.canDefine(id.Name, key, id.P) == nil {
			e.put(key, &Binding{Name: id.Name, Pos: id.P, Unavailable: true, Cause: cause})
		}
	}
}

// checkBody makes sure every name in a function body is a parameter, a
// name defined above, a constant, or a function defined above; a function
// may not call itself.
func (e *Env) checkBody(n Node, selfID *Ident, params map[string]bool) error {
	self, selfKey := selfID.Name, selfID.key()
	var err error
	Walk(n, func(n Node) bool {
		if err != nil {
			return false
		}
		switch n := n.(type) {
		case *Call:
			name, key := n.Fun.Name, n.Fun.key()
			if key == selfKey {
				err = Errorf(n.Fun.P, "%s cannot call itself", self)
				return false
			}
			if params[key] || e.vars[key] != nil || e.funcs[key] != nil {
				return true
			}
			if _, ok := builtins[key]; ok {
				return true
			}
			err = Errorf(n.Fun.P, "unknown function %q (a function can use only functions defined above it)", name)
			return false
		case *Ident:
			key := n.key()
			if params[key] || e.vars[key] != nil {
				return true
			}
			if _, ok := constants[key]; ok {
				return true
			}
			if key == selfKey {
				err = Errorf(n.P, "%s cannot use itself", self)
				return false
			}
			err = Errorf(n.P, "unknown name %q in the body of %s (use a parameter or a name defined above)", n.Name, self)
			return false
		}
		return true
	})
	return err
}

// Walk calls f for n and, while f returns true, for its children in order.
func Walk(n Node, f func(Node) bool) {
	if n == nil || !f(n) {
		return
	}
	switch n := n.(type) {
	case *WithUnit:
		Walk(n.X, f)
	case *Unary:
		Walk(n.X, f)
	case *Binary:
		Walk(n.X, f)
		Walk(n.Y, f)
	case *Paren:
		Walk(n.X, f)
	case *Abs:
		Walk(n.X, f)
	case *Call:
		for _, a := range n.Args {
			Walk(a, f)
		}
	case *MatrixLit:
		for _, r := range n.Rows {
			for _, x := range r {
				Walk(x, f)
			}
		}
	case *Compare:
		for _, x := range n.X {
			Walk(x, f)
		}
	case *CaseLit:
		for _, x := range n.X {
			Walk(x, f)
		}
	}
}

// String returns a short description of a Result for debugging.
func (r *Result) String() string {
	if r.Err != nil {
		return "error: " + r.Err.Error()
	}
	if r.Check != nil {
		return fmt.Sprintf("check pass=%v", r.Check.Pass)
	}
	if r.Value != nil {
		return FormatValue(r.Value, nil, 4)
	}
	return ""
}

// LiteralUnit returns the unit of an expression that is a number written
// with a unit ("1.15 Ω/km", "-40 kV", "230 V∠-120°", "(0.12 + j0.08) Ω"),
// or nil. Angle units are not returned (angles are shown in degrees by
// their own rule); % and pu are: "u_k = 6 %" is shown as 6.000 %.
func LiteralUnit(n Node) *Unit {
	switch n := n.(type) {
	case *Unary:
		return LiteralUnit(n.X)
	case *Paren:
		return LiteralUnit(n.X)
	case *Binary:
		if n.Op == ANGLE && isNumeric(n.Y) {
			return LiteralUnit(n.X)
		}
	case *WithUnit:
		if n.Unit.Angle || n.Unit.Dim.IsZero() && !n.Unit.Plain || !isNumeric(n.X) {
			return nil
		}
		return n.Unit
	}
	return nil
}

// isNumeric reports whether n uses no name: numbers, units and operators only.
func isNumeric(n Node) bool {
	ok := true
	Walk(n, func(n Node) bool {
		switch n.(type) {
		case *Ident, *Call, *MatrixLit:
			ok = false
		}
		return ok
	})
	return ok
}
