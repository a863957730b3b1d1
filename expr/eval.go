package expr

import (
	"fmt"
	"math"
	"math/cmplx"
	"strings"
)

// Trace records the value that each name, and each entry picked from a
// matrix, had in an evaluation, so that a sheet can show the formula with
// the values substituted. The zero Trace is empty and ready to use.
type Trace struct {
	entries []traceEntry
	// more holds what few lines record: a trace costs one pointer for it
	more *traceMore
}

// traceMore is what a trace records besides the values of names.
type traceMore struct {
	lookups []Lookup // the table look-ups (tables.go)
	// extremes are the cases casemax and casemin chose (cases.go)
	extremes []traceExtreme
}

// extra returns t's traceMore, making it.
func (t *Trace) extra() *traceMore {
	if t.more == nil {
		t.more = new(traceMore)
	}
	return t.more
}

type traceEntry struct {
	n Node
	v Value
}

// Value returns the value recorded for n.
func (t *Trace) Value(n Node) (Value, bool) {
	if t == nil {
		return nil, false
	}
	for _, e := range t.entries {
		if e.n == n {
			return e.v, true
		}
	}
	return nil, false
}

// Values returns the values recorded, in the order of evaluation.
func (t *Trace) Values() []Value {
	if t == nil {
		return nil
	}
	out := make([]Value, len(t.entries))
	for i, e := range t.entries {
		out[i] = e.v
	}
	return out
}

// Len is the number of values recorded.
func (t *Trace) Len() int {
	if t == nil {
		return 0
	}
	return len(t.entries)
}

func (t *Trace) record(n Node, v Value) {
	switch n.(type) {
	case *Ident, *Call:
		if t.entries == nil {
			t.entries = make([]traceEntry, 0, 8)
		}
		t.entries = append(t.entries, traceEntry{n, v})
	}
}

// MaxCallDepth bounds nested user-function calls.
const MaxCallDepth = 64

type evaluator struct {
	env    *Env
	trace  *Trace
	locals map[string]Value
	// params and args are the parameters (keys) of the user function
	// being evaluated and their values, seen before locals: a call
	// hands its arguments over without a map or a box
	params []string
	args   []val
	depth  int
}

// local is the value of a parameter or a local name.
func (ev *evaluator) local(key string) (val, bool) {
	for i, p := range ev.params {
		if p == key {
			return ev.args[i], true
		}
	}
	if v, ok := ev.locals[key]; ok {
		return unbox(v), true
	}
	return val{}, false
}

// charge spends n units of the document's budget for work at pos (see
// Budget): every node of every user-function body each time it runs,
// every matrix entry, every multiply-add. Without it, functions that
// each call the one above twice would take 2^n steps.
func (ev *evaluator) charge(n int64, pos Pos) error {
	if err := ev.env.Budget.Charge(n, pos); err != nil {
		return err
	}
	return nil
}

// Eval evaluates an expression in env. When trace is not nil, the values of
// the names in the expression are recorded in it (those inside
// user-function bodies are not).
// The error is an *Error or an *UnavailableError.
func (e *Env) Eval(n Node, trace *Trace) (Value, error) {
	ev := evaluator{env: e, trace: trace}
	return ev.result(n)
}

// EvalWith evaluates n with extra local names (the parameters of a user
// function, a sweep variable) that hide nothing but are seen first.
func (e *Env) EvalWith(n Node, locals map[string]Value, trace *Trace) (Value, error) {
	// every local name is looked at once (keyedLocals): a sweep point or
	// a solve residual pays for the names it hands over
	if err := e.Budget.Charge(LocalWork*int64(len(locals)), n.Pos()); err != nil {
		return nil, err
	}
	ev := evaluator{env: e, trace: trace, locals: keyedLocals(locals)}
	return ev.result(n)
}

// EvalKeyed is EvalWith for locals already keyed by NameKey, as a sweep
// and a solve block key them: it does not look at every local name, so a
// sweep point or a solve residual costs its expression, not its names.
//
// Each call costs KeyedWork besides its expression: the caller's handling
// of the point (setting the names, taking the value back), which a sweep
// of many short lines repeats at every point.
func (e *Env) EvalKeyed(n Node, locals map[string]Value, trace *Trace) (Value, error) {
	if err := e.Budget.Charge(KeyedWork, n.Pos()); err != nil {
		return nil, err
	}
	ev := evaluator{env: e, trace: trace, locals: locals}
	return ev.result(n)
}

// result evaluates n and boxes its value: the one allocation of a
// scalar result.
func (ev *evaluator) result(n Node) (Value, error) {
	v, err := ev.eval(n)
	if err != nil {
		return nil, err
	}
	return v.value(), nil
}

// eval charges a node's work, computes its value and checks it (check):
// finite, of a physical unit, its power kind settled, recorded in the
// trace.
func (ev *evaluator) eval(n Node) (val, error) {
	if b, ok := n.(*Binary); ok {
		if _, left := b.X.(*Binary); left {
			return ev.evalChain(b)
		}
	}
	if err := ev.charge(NodeWork, n.Pos()); err != nil {
		return val{}, err
	}
	v, err := ev.eval1(n)
	if err != nil {
		return val{}, err
	}
	if err := ev.check(n, &v); err != nil {
		return val{}, err
	}
	return v, nil
}

// evalChain evaluates a binary operation whose left operand is one too
// (a + b + c + …, the way a long sum parses) along its left spine with a
// loop rather than a recursion, so that a sum of a million terms costs a
// million steps and no stack. Each operation is charged and checked as
// eval does.
func (ev *evaluator) evalChain(top *Binary) (val, error) {
	var buf [8]*Binary
	spine := buf[:0]
	var x Node = top
	for {
		b, ok := x.(*Binary)
		if !ok {
			break
		}
		spine = append(spine, b)
		x = b.X
	}
	acc, err := ev.eval(x)
	if err != nil {
		return val{}, err
	}
	for i := len(spine) - 1; i >= 0; i-- {
		b := spine[i]
		if err := ev.charge(NodeWork, b.Pos()); err != nil {
			return val{}, err
		}
		if acc, err = ev.binary(b, acc); err != nil {
			return val{}, err
		}
		if err := ev.check(b, &acc); err != nil {
			return val{}, err
		}
	}
	return acc, nil
}

// binary evaluates the right operand of n and applies n to the left
// operand's value x.
func (ev *evaluator) binary(n *Binary, x val) (val, error) {
	y, err := ev.eval(n.Y)
	if err != nil {
		return val{}, err
	}
	if n.Op != ADD && n.Op != SUB {
		// an absolute temperature enters a product, quotient, power
		// or parallel combination in K (temperature.go)
		x, y = ev.inKelvin(n.X, x), ev.inKelvin(n.Y, y)
	}
	if x.m != nil || y.m != nil {
		if w := productWorkVal(n, &x, &y); w > 0 {
			if err := ev.charge(w, n.OpPos); err != nil {
				return val{}, err
			}
		}
		r, err := matrixOp(n, x.value(), y.value())
		if err != nil {
			return val{}, err
		}
		return unbox(r), nil
	}
	s, err := binaryScalar(n, x.s, y.s)
	return val{s: s}, err
}

func scalarOf(v Value) (*Scalar, bool) {
	s, ok := v.(*Scalar)
	return s, ok
}

// Describe names a value for an error message: "3 V", "a 3×3 matrix".
func Describe(v Value) string {
	switch x := v.(type) {
	case *Scalar:
		sh := FormatScalar(x, nil, 4)
		sh.A, sh.B = trimZeros(sh.A), trimZeros(sh.B)
		return sh.String()
	case *Matrix:
		if x.Cols == 1 {
			return fmt.Sprintf("a vector of %d entries", x.Rows)
		}
		return fmt.Sprintf("a %d×%d matrix", x.Rows, x.Cols)
	}
	return "?"
}

func (ev *evaluator) eval1(n Node) (val, error) {
	switch n := n.(type) {
	case *Number:
		if n.Imag {
			return val{s: Scalar{Z: complex(0, n.Value)}}, nil
		}
		return val{s: Scalar{Z: complex(n.Value, 0)}}, nil
	case *Ident:
		return ev.ident(n)
	case *Paren:
		return ev.eval(n.X)
	case *WithUnit:
		x, err := ev.eval(n.X)
		if err != nil {
			return val{}, err
		}
		if n.Unit.Offset != 0 {
			return ev.withOffsetUnit(n, x, false)
		}
		if m := x.m; m != nil {
			out := NewMatrix(m.Rows, m.Cols)
			for i, e := range m.E {
				out.E[i] = Scalar{Z: e.Z * complex(n.Unit.Scale, 0), Dim: e.Dim.Mul(n.Unit.Dim), Angle: n.Unit.Angle && e.Dim.IsZero(), Kind: n.Unit.Kind}
				if out.E[i].Z == 0 && e.Z != 0 {
					return val{}, underflow(opPos(n), "value in "+n.Unit.Text)
				}
			}
			out.Resid = residScale(m, complex(n.Unit.Scale, 0), false)
			return val{m: out}, nil
		}
		s := &x.s
		if z := s.Z * complex(n.Unit.Scale, 0); z == 0 && s.Z != 0 {
			return val{}, underflow(opPos(n), "value in "+n.Unit.Text)
		}
		return val{s: Scalar{Z: s.Z * complex(n.Unit.Scale, 0), Dim: s.Dim.Mul(n.Unit.Dim), Angle: n.Unit.Angle && s.Dim.IsZero(), Kind: n.Unit.Kind}}, nil
	case *Unary:
		if u, ok := n.X.(*WithUnit); ok && n.Op == SUB && u.Unit.Offset != 0 {
			// "-20 °C" is (-20) °C, a temperature below zero on the scale
			x, err := ev.eval(u.X)
			if err != nil {
				return val{}, err
			}
			return ev.withOffsetUnit(u, x, true)
		}
		x, err := ev.eval(n.X)
		if err != nil {
			return val{}, err
		}
		if n.Op == ADD {
			return x, nil
		}
		if x.hasTemp() {
			return val{}, negTemp(n.P, x.value())
		}
		if x.m != nil {
			return val{m: neg(x.m).(*Matrix)}, nil
		}
		return val{s: Scalar{Z: canonZ(-x.s.Z), Dim: x.s.Dim, Angle: x.s.Angle, Kind: x.s.Kind}}, nil
	case *Abs:
		x, err := ev.eval(n.X)
		if err != nil {
			return val{}, err
		}
		x = ev.inKelvin(n.X, x)
		if x.m != nil {
			return val{}, Errorf(n.P, "|x| needs a single value, not %s (use det for a determinant)", Describe(x.m))
		}
		s := &x.s
		return val{s: Scalar{Z: complex(cmplx.Abs(s.Z), 0), Dim: s.Dim, Kind: absKind(s)}}, nil
	case *Binary:
		x, err := ev.eval(n.X)
		if err != nil {
			return val{}, err
		}
		return ev.binary(n, x)
	case *Call:
		return ev.call(n)
	case *MatrixLit:
		m := NewMatrix(len(n.Rows), len(n.Rows[0]))
		for i, row := range n.Rows {
			for j, en := range row {
				v, err := ev.eval(en)
				if err != nil {
					return val{}, err
				}
				if v.m != nil {
					return val{}, Errorf(en.Pos(), "a matrix entry must be a single value, not %s", Describe(v.m))
				}
				m.Set(i, j, v.s)
			}
		}
		return val{m: m}, nil
	case *CaseLit:
		return ev.caseLit(n)
	case *Compare:
		return val{}, Errorf(n.P, "a comparison is allowed only in a check")
	case *BadExpr:
		return val{}, Errorf(n.P, "this expression could not be read")
	}
	return val{}, Errorf(n.Pos(), "cannot evaluate this expression")
}

// keyedLocals returns locals keyed by NameKey: locals itself when every
// name in it is its own key, the usual case, else a copy.
func keyedLocals(locals map[string]Value) map[string]Value {
	for k := range locals {
		if NameKey(k) != k {
			out := make(map[string]Value, len(locals))
			for k, v := range locals {
				out[NameKey(k)] = v
			}
			return out
		}
	}
	return locals
}

func (ev *evaluator) ident(n *Ident) (val, error) {
	key := n.key()
	if v, ok := ev.local(key); ok {
		return v, nil
	}
	if b := ev.env.vars[key]; b != nil {
		if b.Unavailable {
			return val{}, &UnavailableError{Pos: n.P, Name: n.Name, Def: b.cause()}
		}
		v, err := ev.env.bindingValue(b, n.P, n.Name)
		if err != nil {
			return val{}, err
		}
		return unbox(v), nil
	}
	if err := ev.tableRef(n); err != nil {
		return val{}, err
	}
	if c, ok := constants[key]; ok {
		return unbox(c), nil
	}
	if _, ok := builtins[key]; ok {
		return val{}, Errorf(n.P, "%q is a function: call it with parentheses, e.g. %s(x)", n.Name, n.Name)
	}
	if f := ev.env.funcs[key]; f != nil {
		return val{}, Errorf(n.P, "%q is a function defined at line %d: call it with parentheses", n.Name, f.Pos.Line())
	}
	return val{}, Errorf(n.P, "unknown name %q%s", n.Name, ev.suggestName(n.Name))
}

func (ev *evaluator) suggestName(name string) string {
	best, bestD := "", 3
	// a suggestion compares the name with every name: optional work, left
	// out when the budget cannot hold it
	if !ev.env.Budget.TryCharge(suggestWork * int64(len(ev.env.order)+len(ev.params)+len(ev.locals))) {
		return ""
	}
	for _, k := range ev.env.order {
		if d := editDistance(name, k); d < bestD && d <= len(name)/2 {
			best, bestD = k, d
		}
	}
	for _, k := range ev.params {
		if d := editDistance(name, k); d < bestD && d <= len(name)/2 {
			best, bestD = k, d
		}
	}
	for k := range ev.locals {
		if d := editDistance(name, k); d < bestD && d <= len(name)/2 {
			best, bestD = k, d
		}
	}
	if best != "" {
		return fmt.Sprintf(" (did you mean %q?)", best)
	}
	if _, _, _, ok := lookupSymbol(name); ok {
		return fmt.Sprintf(" (%q is a unit: write a unit after a number, e.g. 1 %s)", name, name)
	}
	return ""
}

// constants are the built-in constants.
var constants = map[string]*Scalar{
	"pi": {Z: complex(math.Pi, 0)},
	"π":  {Z: complex(math.Pi, 0)},
	"j":  {Z: complex(0, 1)},
}

func neg(x Value) Value {
	switch x := x.(type) {
	case *Scalar:
		return &Scalar{Z: canonZ(-x.Z), Dim: x.Dim, Angle: x.Angle, Kind: x.Kind}
	case *Matrix:
		out := NewMatrix(x.Rows, x.Cols)
		out.Resid = x.Resid // negation is exact
		for i, e := range x.E {
			out.E[i] = Scalar{Z: canonZ(-e.Z), Dim: e.Dim, Angle: e.Angle, Kind: e.Kind}
		}
		return out
	}
	return x
}

func opName(k Kind) string {
	switch k {
	case ADD:
		return "add"
	case SUB:
		return "subtract"
	case PAR:
		return "combine in parallel"
	}
	return k.String()
}

// binaryScalar applies the operator of n to two single values.
func binaryScalar(n *Binary, xv, yv Scalar) (Scalar, error) {
	xs, ys := &xv, &yv
	switch n.Op {
	case ADD, SUB:
		d, ok := sumDim(xs, ys)
		if !ok {
			return Scalar{}, unitMismatch(n, opName(n.Op), xv, yv)
		}
		z := xs.Z + ys.Z
		if n.Op == SUB {
			z = xs.Z - ys.Z
		}
		k, err := sumKind(n, xs, ys)
		if err != nil {
			return Scalar{}, err
		}
		t, err := sumTemp(n.Op, n.OpPos, xs, ys)
		if err != nil {
			return Scalar{}, err
		}
		// a ± b is an angle when both are (LANGUAGE.md section 3)
		return Scalar{Z: z, Dim: d, Angle: xs.Angle && ys.Angle, Kind: k, AbsTemp: t}, nil
	case MUL:
		if z := xs.Z * ys.Z; z == 0 && xs.Z != 0 && ys.Z != 0 {
			return Scalar{}, underflow(n.OpPos, "product")
		}
		// a·k and k·a with k a plain number that is not an angle
		return Scalar{Z: xs.Z * ys.Z, Dim: xs.Dim.Mul(ys.Dim), Angle: xs.Angle && isPlainFactor(ys) || ys.Angle && isPlainFactor(xs), Kind: scaledKind(xs, ys) | scaledKind(ys, xs)}, nil
	case DIV:
		if ys.Z == 0 {
			return Scalar{}, Errorf(n.Y.Pos(), "division by zero: the divisor is 0")
		}
		if z := xs.Z / ys.Z; z == 0 && xs.Z != 0 {
			return Scalar{}, underflow(n.OpPos, "quotient")
		}
		return Scalar{Z: xs.Z / ys.Z, Dim: xs.Dim.Div(ys.Dim), Angle: xs.Angle && isPlainFactor(ys), Kind: scaledKind(xs, ys)}, nil
	case PAR:
		if xs.Dim != ys.Dim {
			return Scalar{}, unitMismatch(n, opName(n.Op), xv, yv)
		}
		z, err := parallel(n.OpPos, xs.Z, ys.Z)
		if err != nil {
			return Scalar{}, err
		}
		return Scalar{Z: z, Dim: xs.Dim}, nil
	case ANGLE:
		if err := checkAngle(n.Y, ys, "the angle after ∠"); err != nil {
			return Scalar{}, err
		}
		if !ys.IsReal() {
			return Scalar{}, Errorf(n.Y.Pos(), "the angle after ∠ must be real, not %s", describeScalar(yv))
		}
		if !xs.IsReal() {
			return Scalar{}, Errorf(n.X.Pos(), "the magnitude before ∠ must be real, not %s (use abs() for a magnitude)", describeScalar(xv))
		}
		return Scalar{Z: complex(real(xs.Z), 0) * cmplx.Rect(1, real(ys.Z)), Dim: xs.Dim}, nil
	case POW:
		return power(n, xs, ys)
	}
	return Scalar{}, Errorf(n.P, "unknown operator %s", n.Op)
}

// describeScalar is Describe of a single value held by value.
func describeScalar(s Scalar) string { return Describe(&s) }

func unitMismatch(n *Binary, verb string, x, y Scalar) error {
	return Errorf(n.OpPos, "cannot %s %s and %s: the units differ (%s and %s)", verb, describeScalar(x), describeScalar(y), dimWord(x.Dim), dimWord(y.Dim))
}

// dimWord names a dimension in the words of the trade.
func dimWord(d Dim) string {
	switch d {
	case Dim{}:
		return "a plain number"
	case DimVoltage:
		return "a voltage"
	case DimCurrent:
		return "a current"
	case DimImpedance:
		return "an impedance"
	case DimAdmittance:
		return "an admittance"
	case DimPower:
		return "a power"
	case DimEnergy:
		return "an energy"
	case DimFrequency:
		return "a frequency"
	case DimTime:
		return "a time"
	case DimLength:
		return "a length"
	case DimCapacitance:
		return "a capacitance"
	case DimInductance:
		return "an inductance"
	case DimArea:
		return "an area"
	case DimCharge:
		return "a charge"
	}
	return "a quantity in " + d.String()
}

// DimWord names a dimension in words ("a voltage", "an impedance").
func DimWord(d Dim) string { return dimWord(d) }

// power computes x^y. y must be dimensionless; when x has a unit, y must be
// real and make every exponent of the unit whole. Whole exponents are
// computed by repeated multiplication, so that j^2 is exactly -1.
func power(n *Binary, x, y *Scalar) (Scalar, error) {
	if !y.Dim.IsZero() {
		return Scalar{}, Errorf(n.Y.Pos(), "an exponent must be a plain number, not %s", describeScalar(*y))
	}
	if !x.Dim.IsZero() {
		if !y.IsReal() {
			return Scalar{}, Errorf(n.Y.Pos(), "a quantity with a unit can only be raised to a real power")
		}
		p := real(y.Z)
		var d Dim
		for i, e := range x.Dim {
			v := float64(e) * p
			r := math.Round(v)
			if math.Abs(v-r) > 1e-9 || math.Abs(r) > 100 {
				return Scalar{}, Errorf(n.Y.Pos(), "cannot raise %s to the power %g: the unit's exponents would not be whole numbers", dimWord(x.Dim), p)
			}
			d[i] = int8(r)
		}
		z := powZ(x.Z, y.Z)
		if z == 0 && x.Z != 0 {
			return Scalar{}, underflow(n.OpPos, "power")
		}
		return Scalar{Z: z, Dim: d}, nil
	}
	z := powZ(x.Z, y.Z)
	if x.Z == 0 && real(y.Z) < 0 {
		return Scalar{}, Errorf(n.P, "0 raised to a negative power is infinite")
	}
	if z == 0 && x.Z != 0 {
		return Scalar{}, underflow(n.OpPos, "power")
	}
	return Scalar{Z: z}, nil
}

func powZ(x, y complex128) complex128 {
	x, y = canonZ(x), canonZ(y)
	if imag(y) == 0 {
		p := real(y)
		if p == math.Trunc(p) && math.Abs(p) <= 64 {
			k := int(math.Abs(p))
			r := complex(1, 0)
			b := x
			for k > 0 {
				if k&1 == 1 {
					r *= b
				}
				b *= b
				k >>= 1
			}
			if p < 0 {
				return 1 / r
			}
			return r
		}
		if imag(x) == 0 && real(x) >= 0 {
			return complex(math.Pow(real(x), p), 0)
		}
	}
	return cmplx.Pow(x, y)
}

// trimZeros drops trailing zeros after a decimal point: "3.000" -> "3".
func trimZeros(s string) string {
	if !strings.Contains(s, ".") || strings.ContainsAny(s, "e∞") {
		return s
	}
	s = strings.TrimRight(s, "0")
	return strings.TrimSuffix(s, ".")
}

func (b *Binding) cause() Pos {
	if b.Cause.IsValid() {
		return b.Cause
	}
	return b.Pos
}
