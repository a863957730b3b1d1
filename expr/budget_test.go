package expr

import (
	"strings"
	"testing"
)

// TestBudgetCharges: the work of A·B for two 3×3 matrices, by hand
// derivation from the weights of budget.go: each name is a node (10) that
// yields a matrix of 9 entries (2 each: 18), so 28 each; the product node
// costs 10, its 27 multiply-adds twice (54) and its 9 entries (18): 82.
// In all 28 + 28 + 82 = 138 units. They are charged in the order of
// evaluation: the product node's 10, the two names (66 by then), the
// multiply-adds (120), the result's entries (138). With a budget of 138 it
// is evaluated; with 119 it is refused at the operator, before the product
// is made, having spent 66; every later evaluation says it was not
// evaluated.
func TestBudgetCharges(t *testing.T) {
	setup := func(limit int64) *Env {
		b := runBlock("A = [1, 2, 3; 4, 5, 6; 7, 8, 9]\nB = A")
		if errs := b.allErrors(); len(errs) > 0 {
			t.Fatal(errs)
		}
		b.env.Budget = NewBudget(limit)
		return b.env
	}
	prod := func(env *Env) (Value, error) {
		var errs ErrorList
		x, _ := ParseExpr(NewSource("A*B", PlaceAt("A*B", 7, 1)), &errs)
		return env.Eval(x, nil)
	}
	env := setup(138)
	if _, err := prod(env); err != nil || env.Budget.Spent() != 138 {
		t.Errorf("budget 138: %v, spent %d, want no error and 138", err, env.Budget.Spent())
	}
	env = setup(119)
	_, err := prod(env)
	e, ok := err.(*Error)
	if !ok || e != env.Budget.Over() || e.Pos.Position().InFile() != (Position{Line: 7, Col: 2}) {
		t.Fatalf("budget 119: error %v at %v, want the budget's error at 7:2 (the operator)", err, errPos(err))
	}
	for _, want := range []string{"work budget of 119 units is spent here", "asked for 54 more", "Split the work"} {
		if !strings.Contains(e.Msg, want) {
			t.Errorf("message %q lacks %q", e.Msg, want)
		}
	}
	if env.Budget.Spent() != 66 {
		t.Errorf("spent %d, want 66 (the product node and the two names)", env.Budget.Spent())
	}
	_, err = prod(env)
	if m := errMsg(err); !strings.HasPrefix(m, "not evaluated: the document's work budget was spent at line 7") || !env.Budget.Owns(err) {
		t.Errorf("after the budget is spent: %q", m)
	}
}

// TestBudgetStop: a stopped budget refuses every later charge, without
// counting as spent.
func TestBudgetStop(t *testing.T) {
	b := runBlock("x = 2")
	b.env.Budget.Stop()
	var errs ErrorList
	x, _ := ParseExpr(NewSource("x + 1", PlaceAt("x + 1", 3, 1)), &errs)
	if _, err := b.env.Eval(x, nil); !strings.Contains(errMsg(err), "the evaluation was stopped") {
		t.Errorf("after Stop: %v", err)
	}
	if b.env.Budget.Over() != nil || !b.env.Budget.Stopped() {
		t.Errorf("a stopped budget is not spent: Over %v, Stopped %v", b.env.Budget.Over(), b.env.Budget.Stopped())
	}
}

// TestGroupDigits: the numbers of the budget's message.
func TestGroupDigits(t *testing.T) {
	for n, want := range map[int64]string{0: "0", 999: "999", 1000: "1,000", 100000000: "100,000,000", -1234: "-1,234"} {
		if got := groupDigits(n); got != want {
			t.Errorf("groupDigits(%d) = %q, want %q", n, got, want)
		}
	}
}
