package expr

import (
	"fmt"
	"math"
	"math/cmplx"
	"strings"
	"testing"
)

// This file holds the helpers shared by the package's tests: running a
// block, and writing a parse tree as an S-expression so that the grammar
// tests can state the expected tree by hand from LANGUAGE.md.

// block is the outcome of parsing and executing one calc block.
type block struct {
	stmts   []Stmt
	results []*Result
	parse   ErrorList
	env     *Env
}

// runBlock parses text as a calc block whose first line is line 1 of the
// file, and executes every statement in order in a new Env.
func runBlock(text string) *block {
	b := &block{env: NewEnv()}
	b.stmts = ParseBlock(NewSource(text, Pos{}), CalcMode, &b.parse)
	for _, s := range b.stmts {
		b.results = append(b.results, b.env.Exec(s))
	}
	return b
}

// allErrors lists the parse errors and then the errors of the statements,
// in that order.
func (b *block) allErrors() []error {
	var out []error
	for _, e := range b.parse {
		out = append(out, e)
	}
	for _, r := range b.results {
		if r.Err != nil {
			out = append(out, r.Err)
		}
	}
	return out
}

// errPos returns the position of an *Error or *UnavailableError.
func errPos(err error) Pos {
	switch e := err.(type) {
	case *Error:
		return e.Pos
	case *UnavailableError:
		return e.Pos
	}
	return Pos{}
}

// errMsg returns the message of an error without its position.
func errMsg(err error) string {
	if e, ok := err.(*Error); ok {
		return e.Msg
	}
	return err.Error()
}

// evalLast runs text as a block and returns the value of its last
// statement. It fails the test on any error.
func evalLast(t *testing.T, text string) Value {
	t.Helper()
	b := runBlock(text)
	if errs := b.allErrors(); len(errs) > 0 {
		t.Fatalf("%q: unexpected error: %v", text, errs[0])
	}
	if len(b.results) == 0 {
		t.Fatalf("%q: no statement", text)
	}
	v := b.results[len(b.results)-1].Value
	if v == nil {
		t.Fatalf("%q: last statement has no value", text)
	}
	return v
}

// evalScalar is evalLast for a scalar result.
func evalScalar(t *testing.T, text string) *Scalar {
	t.Helper()
	v := evalLast(t, text)
	s, ok := v.(*Scalar)
	if !ok {
		t.Fatalf("%q: want a scalar, got %s", text, FormatValue(v, nil, 6))
	}
	return s
}

// evalMatrix is evalLast for a matrix result.
func evalMatrix(t *testing.T, text string) *Matrix {
	t.Helper()
	v := evalLast(t, text)
	m, ok := v.(*Matrix)
	if !ok {
		t.Fatalf("%q: want a matrix, got %s", text, FormatValue(v, nil, 6))
	}
	return m
}

// firstError runs text and returns its first error (parse errors first),
// or nil.
func firstError(text string) error {
	errs := runBlock(text).allErrors()
	if len(errs) == 0 {
		return nil
	}
	return errs[0]
}

// closeZ reports whether got is within rel·max(|want|, floor) of want.
func closeZ(got, want complex128, rel, floor float64) bool {
	return cmplx.Abs(got-want) <= rel*math.Max(cmplx.Abs(want), floor)
}

// lit writes a float so that the scanner reads back the same double.
func lit(x float64) string { return fmt.Sprint(x) }

// zlit writes a complex number as a calcdoc expression "a + jb" that
// evaluates to exactly z (a real plus an imaginary literal is exact).
func zlit(z complex128) string {
	re, im := real(z), imag(z)
	if im < 0 {
		return fmt.Sprintf("(%s - j%s)", lit(re), lit(-im))
	}
	return fmt.Sprintf("(%s + j%s)", lit(re), lit(im))
}

// matLit writes a complex matrix as a calcdoc matrix literal.
func matLit(rows [][]complex128) string {
	var b strings.Builder
	b.WriteByte('[')
	for i, r := range rows {
		if i > 0 {
			b.WriteString("; ")
		}
		for j, z := range r {
			if j > 0 {
				b.WriteString(", ")
			}
			b.WriteString(zlit(z))
		}
	}
	b.WriteByte(']')
	return b.String()
}

var opSym = map[Kind]string{ADD: "+", SUB: "-", MUL: "*", DIV: "/", POW: "^", PAR: "∥", ANGLE: "∠",
	LT: "<", LE: "<=", GT: ">", GE: ">=", EQ: "==", NE: "!="}

// sexpr writes a node as an S-expression: numbers and names as written,
// (unit X u), (neg X), (op X Y), (paren X), (abs X), (call f args...),
// [a b; c d], (cmp X op Y ...).
func sexpr(n Node) string {
	switch n := n.(type) {
	case nil:
		return "<nil>"
	case *Number:
		return n.Text
	case *Ident:
		return n.Name
	case *WithUnit:
		return fmt.Sprintf("(unit %s %s)", sexpr(n.X), n.Unit.Text)
	case *Unary:
		if n.Op == SUB {
			return "(neg " + sexpr(n.X) + ")"
		}
		return "(pos " + sexpr(n.X) + ")"
	case *Binary:
		return fmt.Sprintf("(%s %s %s)", opSym[n.Op], sexpr(n.X), sexpr(n.Y))
	case *Paren:
		return "(paren " + sexpr(n.X) + ")"
	case *Abs:
		return "(abs " + sexpr(n.X) + ")"
	case *Call:
		parts := []string{"call", n.Fun.Name}
		for _, a := range n.Args {
			parts = append(parts, sexpr(a))
		}
		return "(" + strings.Join(parts, " ") + ")"
	case *MatrixLit:
		var rows []string
		for _, r := range n.Rows {
			var es []string
			for _, e := range r {
				es = append(es, sexpr(e))
			}
			rows = append(rows, strings.Join(es, " "))
		}
		return "[" + strings.Join(rows, "; ") + "]"
	case *Compare:
		parts := []string{"cmp", sexpr(n.X[0])}
		for i, op := range n.Ops {
			parts = append(parts, opSym[op], sexpr(n.X[i+1]))
		}
		return "(" + strings.Join(parts, " ") + ")"
	case *BadExpr:
		return "(badexpr)"
	}
	return fmt.Sprintf("<%T>", n)
}

// stmtString writes a statement: (= name X), (= name[disp] X),
// (= a,b X), (def f(a,b) X), (check ...), (note text), (bad), or the bare
// expression (with [disp] after it when present).
func stmtString(s Stmt) string {
	disp := func(d *Display) string {
		if d == nil {
			return ""
		}
		form := map[Form]string{FormAuto: "", FormPolar: " polar", FormRect: " rect"}[d.Form]
		u := ""
		if d.Unit != nil {
			u = d.Unit.Text
		}
		return "[" + strings.TrimSpace(u+form) + "]"
	}
	switch s := s.(type) {
	case *Assign:
		var names []string
		for _, id := range s.Names {
			names = append(names, id.Name)
		}
		return fmt.Sprintf("(= %s%s %s)", strings.Join(names, ","), disp(s.Display), sexpr(s.X))
	case *FuncDef:
		var ps []string
		for _, p := range s.Params {
			ps = append(ps, p.Name)
		}
		return fmt.Sprintf("(def %s(%s) %s)", s.Name.Name, strings.Join(ps, ","), sexpr(s.Body))
	case *Check:
		return "(check " + sexpr(s.Cmp) + ")"
	case *Note:
		return "(note " + s.Text + ")"
	case *BadStmt:
		return "(bad)"
	case *ExprStmt:
		return sexpr(s.X) + disp(s.Display)
	case *Equation:
		l := ""
		if s.Label != nil {
			l = s.Label.Name + ": "
		}
		return fmt.Sprintf("(eq %s%s %s)", l, sexpr(s.LHS), sexpr(s.RHS))
	}
	return fmt.Sprintf("<%T>", s)
}

// spans lists every node of a statement's expression in Walk order as
// "Type P-E".
func spans(n Node) string {
	var parts []string
	Walk(n, func(n Node) bool {
		name := strings.TrimPrefix(fmt.Sprintf("%T", n), "*expr.")
		parts = append(parts, fmt.Sprintf("%s %s-%s", name, n.Pos(), n.End()))
		return true
	})
	return strings.Join(parts, ", ")
}
