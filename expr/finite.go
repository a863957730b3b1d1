package expr

import (
	"math"
	"math/cmplx"
)

// Nothing that is not finite is ever a value (LANGUAGE.md section 4).
// IEEE 754-2019 arithmetic signals overflow by a result of ±∞ (7.4),
// an invalid operation such as 0/0, ∞ − ∞ or 0·∞ by NaN (7.2), and
// underflow by a result that is subnormal or zero (7.5). The evaluator
// turns each into an error at the operator or function that produced it:
//
//   - a result with an infinite or NaN part (nonFinite, checked after
//     every node, so that the innermost operation that produced it is
//     the one named);
//   - a product, quotient, power, unit scaling or parallel combination
//     of non-zero operands whose result is exactly zero (underflow): the
//     true value is non-zero, and 0 would change every result that uses
//     it (a division by it, a check against 0). A result that is merely
//     subnormal is kept: it is not zero, and its relative error shows
//     only in digits far beyond those a sheet prints.

// nonFinite returns the error for a value v of node n that has a part
// that is infinite or not a number, or nil.
func nonFinite(n Node, v Value) error {
	var nan, inf bool
	look := func(z complex128) {
		if cmplx.IsNaN(z) {
			nan = true
		} else if cmplx.IsInf(z) {
			inf = true
		}
	}
	switch x := v.(type) {
	case *Scalar:
		look(x.Z)
	case *Matrix:
		for _, e := range x.E {
			look(e.Z)
		}
	}
	if !nan && !inf {
		return nil
	}
	what := "this operation"
	switch n := n.(type) {
	case *Binary:
		what = "this " + opNoun(n.Op)
	case *Call:
		what = n.Fun.Name + "(...)"
	case *WithUnit:
		what = "this value in " + n.Unit.Text
	case *Unary:
		what = "this negation"
	case *Abs:
		what = "this magnitude"
	case *Ident:
		what = "the value of " + n.Name
	case *Number:
		what = "this number"
	}
	if nan {
		return Errorf(opPos(n), "%s is undefined (such as 0/0 or ∞ − ∞): no finite value is a result of it", what)
	}
	return Errorf(opPos(n), "%s overflows: its result exceeds %.4g in coherent SI units, the largest number calcdoc can hold", what, math.MaxFloat64)
}

// opPos is where the operation of n is written: the operator of an infix
// expression, the unit of a quantity, else the start of n.
func opPos(n Node) Pos {
	switch n := n.(type) {
	case *Binary:
		return n.OpPos
	case *WithUnit:
		if n.UPos.IsValid() {
			return n.UPos
		}
	}
	return n.Pos()
}

func opNoun(k Kind) string {
	switch k {
	case ADD:
		return "sum"
	case SUB:
		return "difference"
	case MUL:
		return "product"
	case DIV:
		return "quotient"
	case POW:
		return "power"
	case PAR:
		return "parallel combination"
	case ANGLE:
		return "phasor"
	}
	return "operation"
}

// underflow is the error of an operation of non-zero operands whose
// result is too small to be held and became 0.
func underflow(p Pos, what string) error {
	return Errorf(p, "this %s underflows: its operands are not zero, but the result is below %.2g in coherent SI units, the smallest number calcdoc can hold, and would be 0", what, math.SmallestNonzeroFloat64)
}

// parallel is a∥b = a·b/(a+b), computed as a/(1 + a/b) with |a| ≤ |b|
// (the sides swapped if need be). The quotient a/b has magnitude at most
// 1, so neither it nor 1 + a/b can overflow, and the result a/(1 + a/b)
// is of the order of a: it underflows only when the true result is below
// the smallest subnormal number. The product a·b of the textbook form
// underflows already for |a|, |b| near 1e-170 and overflows near 1e155.
// a + b = 0 with a ≠ 0 (1 + a/b = 0) has no finite result; 0∥0 is 0.
func parallel(p Pos, a, b complex128) (complex128, error) {
	if cmplx.Abs(a) > cmplx.Abs(b) {
		a, b = b, a
	}
	if a == 0 {
		return 0, nil
	}
	d := 1 + a/b
	if d == 0 {
		return 0, Errorf(p, "parallel combination is infinite: the two sides sum to zero (a∥b = a·b/(a+b))")
	}
	z := a / d
	if z == 0 {
		return 0, underflow(p, "parallel combination")
	}
	return z, nil
}
