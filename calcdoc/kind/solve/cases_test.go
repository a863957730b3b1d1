package solve

import (
	"math"
	"strings"
	"testing"

	"calcdoc/expr"
)

// A solve block whose equations read a value with cases is solved once
// per case. exp(x) = k has the solution x = ln 2 for k = 2 (hand
// derivation) and none for k = 0 (exp never reaches 0): the second case
// is an error naming it, x has no value there, and a check on x has no
// verdict, while case a stands. Ohm's law V = Z·I (common practice)
// gives I = 230/10 = 23 A and 240/10 = 24 A.
func TestSolvePerCase(t *testing.T) {
	d := solveDoc(t, "---\ncases: [a, b]\n---\n```calc\nk = {a: 2, b: 0}\nV_s = {a: 230 V, b: 240 V}\nZ_1 = 10 Ω\n```\n\n"+
		"```solve x\nexp(x) = k\n```\n\n```solve I[A]\nV_s = Z_1 * I\n```\n\n```calc\ny = x + 1\ncheck x >= 0\n```\n")
	if len(d.Errors) != 1 || !strings.Contains(d.Errors[0].Msg, "in case b:") {
		t.Fatalf("want one error naming case b, got %v", d.Errors)
	}
	x := d.Env.Lookup("x")
	if len(x.Cases) != 2 || x.Cases[1] != nil || math.Abs(real(x.Cases[0].(*expr.Scalar).Z)-math.Ln2) > 1e-9 {
		t.Errorf("x per case = %v, want ln 2 and none", x.Cases)
	}
	i := d.Env.Lookup("I")
	if len(i.Cases) != 2 || math.Abs(real(i.Cases[0].(*expr.Scalar).Z)-23) > 1e-9 || math.Abs(real(i.Cases[1].(*expr.Scalar).Z)-24) > 1e-9 {
		t.Errorf("I per case = %v, want 23 A and 24 A", i.Cases)
	}
	y := d.Env.Lookup("y")
	if y.Unavailable || y.Cases[1] != nil || math.Abs(real(y.Cases[0].(*expr.Scalar).Z)-(1+math.Ln2)) > 1e-9 {
		t.Errorf("y: case a stands, case b has no value: %+v", y)
	}
	c := d.Checks[0]
	if c.Cases[0] == nil || !c.Cases[0].Pass || c.Cases[1] != nil || !c.NoVerdict[1] {
		t.Errorf("check x >= 0: holds in a, no verdict in b: %+v", c)
	}
	if _, _, notEval := d.CheckCounts(); notEval != 1 {
		t.Errorf("a check with no verdict in one case is not evaluated as a whole")
	}
}
